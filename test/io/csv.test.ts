import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { CsvError, formatCell, formatFloat32, parseCsv, parseCsvObjects, toCsv } from '../../engine/io/csv.ts';

// Rules checked: RFC 4180 §2 (IETF, 2005). Rule numbers below are the RFC's list items.
// Outside checks: Python's standard csv module (dialect 'excel': comma, '"' quoting, doubled
// quotes, CRLF) reads what we write and writes what we read; NumPy's shortest float32 repr
// (str(numpy.float32) prints the shortest digits that round-trip since numpy 1.14, from memory) is compared with
// formatFloat32.

const PY = '/usr/bin/python3';
const hasPython = spawnSync(PY, ['-c', 'import csv, json'], { encoding: 'utf8' }).status === 0;
const hasNumpy = hasPython && spawnSync(PY, ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;

function python(script: string, input: string): string {
  const r = spawnSync(PY, ['-c', script], { input, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`python failed (${r.status}): ${r.stderr}`);
  return r.stdout;
}

const AWKWARD = ['plain', '', ' lead and trail ', 'a,b', 'say "hi"', '"', '""', 'line1\nline2', 'crlf\r\ninside', 'lone\rcr', ',', 'ünïcødé µm', 'trailing,'];

describe('toCsv (RFC 4180 §2)', () => {
  it('writes the header, one record per row, CRLF terminated (rules 1–3)', () => {
    expect(toCsv(['a', 'b'], [[1, 'x'], [2, 'y']])).toBe('a,b\r\n1,x\r\n2,y\r\n');
    expect(toCsv(['a'], [], { eol: '\n' })).toBe('a\n');
  });

  it('quotes fields with commas, quotes or line breaks, doubling inner quotes (rules 5–7)', () => {
    expect(toCsv(['f'], [['a,b'], ['say "hi"'], ['x\ny'], ['x\r\ny'], ['plain']], { eol: '\n' })).toBe(
      'f\n"a,b"\n"say ""hi"""\n"x\ny"\n"x\r\ny"\nplain\n',
    );
    // The RFC's own example of rule 7: "aaa","b""bb","ccc"
    expect(toCsv(['aaa', 'b"bb', 'ccc'], [], { eol: '\n' })).toBe('aaa,"b""bb",ccc\n');
  });

  it('writes numbers that read back to the same float64, and booleans as words', () => {
    expect(toCsv(['x', 'y', 'z', 'w'], [[0.1, -0, 1e21, true]], { eol: '\n' })).toBe('x,y,z,w\n0.1,-0,1e+21,true\n');
    fc.assert(
      fc.property(fc.double(), (x) => {
        expect(Object.is(Number(formatCell(x)), x)).toBe(true);
      }),
    );
  });

  it('uses per-column formatters, e.g. float32 without float64 noise', () => {
    const f = Math.fround(0.1);
    expect(toCsv(['a', 'b'], [[f, f]], { format: { b: formatFloat32 }, eol: '\n' })).toBe('a,b\n0.10000000149011612,0.1\n');
  });

  it('refuses rows whose length differs from the header (rule 4)', () => {
    expect(() => toCsv(['a', 'b'], [[1]])).toThrow(CsvError);
  });
});

describe('parseCsv (RFC 4180 §2)', () => {
  it('parses the RFC examples: quoted fields, doubled quotes, embedded CRLF', () => {
    expect(parseCsv('"aaa","b""bb","ccc"\r\nzzz,yyy,xxx\r\n')).toEqual({ header: ['aaa', 'b"bb', 'ccc'], rows: [['zzz', 'yyy', 'xxx']] });
    expect(parseCsv('h1,h2,h3\r\n"aaa","b\r\nbb","ccc"\r\n').rows).toEqual([['aaa', 'b\r\nbb', 'ccc']]);
    // Rule 2: the last record may or may not end in a line break.
    expect(parseCsv('a,b\r\n1,2')).toEqual(parseCsv('a,b\r\n1,2\r\n'));
  });

  it('accepts LF and CR line breaks, a BOM, empty fields, and skips blank lines', () => {
    expect(parseCsv('\ufeffa,b\n1,\n\n,2\r3,4\n')).toEqual({ header: ['a', 'b'], rows: [['1', ''], ['', '2'], ['3', '4']] });
    // A quoted empty field is a record, not a blank line.
    expect(parseCsv('a\n""\n').rows).toEqual([['']]);
    expect(parseCsv('')).toEqual({ header: [], rows: [] });
  });

  it('keeps a stray quote inside an unquoted field, but rejects broken quoting', () => {
    expect(parseCsv('a\n5" wide\n').rows).toEqual([['5" wide']]);
    expect(() => parseCsv('a\n"never closed\n')).toThrow(/quoted field starting on line 2 is never closed/);
    expect(() => parseCsv('a,b\n"x"y,2\n')).toThrow(/line 2: unexpected 'y' after a closing quote/);
  });

  it('round-trips any strings through toCsv (property)', () => {
    const cell = fc.oneof(fc.string({ unit: fc.constantFrom('a', ',', '"', '\r', '\n', ' ', 'é') }), fc.constantFrom(...AWKWARD));
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(fc.array(cell, { minLength: 5, maxLength: 5 }), { maxLength: 8 }), (w, rows) => {
        const header = Array.from({ length: w }, (_, i) => `c${i}`);
        const body = rows.map((r) => r.slice(0, w));
        // A one-column row holding '' writes as an empty line, which readers skip (as Python's
        // csv module does); that ambiguity is inherent to the format, so leave it out here.
        const kept = w === 1 ? body.filter((r) => r[0] !== '') : body;
        for (const eol of ['\r\n', '\n'] as const) {
          expect(parseCsv(toCsv(header, kept, { eol }))).toEqual({ header, rows: kept });
        }
      }),
    );
  });
});

describe('parseCsvObjects', () => {
  it('keys rows by header name and checks field counts and duplicate names', () => {
    expect(parseCsvObjects('id,status\n0,reached\n1,"stalled, early"\n')).toEqual([
      { id: '0', status: 'reached' },
      { id: '1', status: 'stalled, early' },
    ]);
    expect(() => parseCsvObjects('a,b\n1\n')).toThrow(/row 1 has 1 fields but the header has 2/);
    expect(() => parseCsvObjects('a,a\n1,2\n')).toThrow(/repeats the column name 'a'/);
  });
});

describe.skipIf(!hasPython)(`CSV against Python's csv module${hasPython ? '' : ` — SKIPPED: ${PY} not runnable`}`, () => {
  const header = ['id', 'text', 'value'];
  const rows = AWKWARD.map((t, i) => [i, t, i / 7]);

  it('Python reads what toCsv writes', () => {
    const csv = toCsv(header, rows);
    // newline='' is what the csv module's documentation requires so it sees raw line breaks.
    const out = python('import sys, io, csv, json; print(json.dumps(list(csv.reader(io.TextIOWrapper(sys.stdin.buffer, encoding="utf-8", newline="")))))', csv);
    expect(JSON.parse(out)).toEqual([header, ...rows.map((r) => r.map(String))]);
  });

  it('we read what Python writes', () => {
    const script = `
import sys, io, csv, json
rows = json.loads(sys.stdin.read())
out = io.StringIO(newline='')
csv.writer(out).writerows(rows)
sys.stdout.buffer.write(out.getvalue().encode('utf-8'))
`;
    const table = [header, ...rows.map((r) => r.map(String))];
    const text = python(script, JSON.stringify(table));
    expect(text).toContain('\r\n'); // Python's excel dialect: CRLF records
    const parsed = parseCsv(text);
    expect([parsed.header, ...parsed.rows]).toEqual(table);
  });
});

describe.skipIf(!hasNumpy)(`formatFloat32 against NumPy's shortest float32 repr${hasNumpy ? '' : ' — SKIPPED: no numpy'}`, () => {
  it('gives the same significant digits as numpy for random float32 values, and round-trips', () => {
    const values: number[] = [0.1, 1 / 3, 2 ** -126, 3.4028234663852886e38, 16777216, 16777217, 1e-7, 123.456, -2.5, 0.3];
    let seed = 12345;
    for (let i = 0; i < 2000; i++) {
      // xorshift32 over raw bit patterns: covers all exponents, not only "nice" decimals
      seed ^= seed << 13;
      seed ^= seed >>> 17;
      seed ^= seed << 5;
      const x = new Float32Array(new Uint32Array([seed >>> 0]).buffer)[0];
      if (Number.isFinite(x)) values.push(x);
    }
    const f32 = values.map((v) => Math.fround(v));
    const mine = f32.map((v) => formatFloat32(v));
    for (let i = 0; i < f32.length; i++) expect(Math.fround(Number(mine[i]))).toBe(f32[i]);

    const theirs = JSON.parse(
      python('import sys, json, numpy; print(json.dumps([str(numpy.float32(v)) for v in json.loads(sys.stdin.read())]))', JSON.stringify(f32)),
    ) as string[];
    const digits = (s: string) => s.replace(/^-/, '').replace(/e.*$/i, '').replace('.', '').replace(/^0+/, '').replace(/0+$/, '');
    // Same number of significant digits. The digits themselves may differ on an exact tie
    // (2183815.25 is as close to 2183815.2 as to 2183815.3, both read back to it): numpy breaks
    // ties to even, Number#toPrecision upwards; both are shortest and both round-trip.
    const mismatches = f32.flatMap((v, i) =>
      digits(mine[i]).length === digits(theirs[i]).length && Math.fround(Number(theirs[i])) === v ? [] : [`${v}: ${mine[i]} vs ${theirs[i]}`],
    );
    const ties = f32.filter((_, i) => digits(mine[i]) !== digits(theirs[i])).length;
    expect(ties).toBeLessThan(f32.length / 100);
    expect(mismatches).toEqual([]);
  });
});
