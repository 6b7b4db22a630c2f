import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { NpyError, decodeNpy, encodeNpy, readNpyHeader, type NpyTypedArray } from '../../engine/io/npy.ts';
import { NpyStreamWriter } from '../../engine/io/npyFileWriter.ts';

// Outside check: NumPy (Debian's python3-numpy, the reference implementation of the NPY
// format) reads what we write, and we read what it writes. CI installs python3-numpy; the
// suite is skipped, with the reason in its title, only where /usr/bin/python3 lacks numpy.

const PY = '/usr/bin/python3';
const probe = spawnSync(PY, ['-c', 'import numpy'], { encoding: 'utf8' });
const hasNumpy = probe.status === 0;
const why = hasNumpy ? '' : ` — SKIPPED: ${PY} cannot import numpy (${(probe.error?.message ?? probe.stderr).trim().split('\n').pop()})`;

function python(script: string, ...args: string[]): string {
  const r = spawnSync(PY, ['-c', script, ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`python failed (${r.status}): ${r.stderr}`);
  return r.stdout;
}

const dir = mkdtempSync(join(tmpdir(), 'axonloom-npy-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Values that are exact in float32 and whose sums are exact in both float32 and float64
// (multiples of 1/4, small), so numpy's float32 pairwise sum and ours agree exactly.
function frames(F: number, N: number): Float32Array {
  const a = new Float32Array(F * N * 3);
  for (let i = 0; i < a.length; i++) a[i] = ((i * 7) % 41) * 0.25 - 5;
  return a;
}

function exactSum(a: NpyTypedArray): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s;
}

const LOAD = `
import sys, json, numpy
a = numpy.load(sys.argv[1])
print(a.dtype, a.shape, float(a.sum()))
print(json.dumps(a.tolist()))
`;

describe(`NPY read by NumPy${why}`, () => {
  it.skipIf(!hasNumpy)('numpy.load reads a float32 [F, N, 3] file from encodeNpy', () => {
    const [F, N] = [6, 5];
    const data = frames(F, N);
    const path = join(dir, 'frames.npy');
    writeFileSync(path, encodeNpy(data, [F, N, 3]));
    const [summary, json] = python(LOAD, path).trim().split('\n');
    expect(summary).toBe(`float32 (${F}, ${N}, 3) ${pyFloat(exactSum(data))}`);
    // Every element, exactly: a float32 widened to float64 prints and parses back unchanged.
    expect((JSON.parse(json) as number[][][]).flat(2)).toEqual(Array.from(data));
  });

  it.skipIf(!hasNumpy)('numpy.load reads a streamed file after the header rewrite', () => {
    const [N, maxF, F] = [4, 100000, 7];
    const path = join(dir, 'stream.npy');
    const w = new NpyStreamWriter(path, '<f4', [N, 3], maxF);
    const all = frames(F, N);
    for (let f = 0; f < F; f++) w.append(all.subarray(f * N * 3, (f + 1) * N * 3));
    expect(w.close()).toBe(F);
    const [summary, json] = python(LOAD, path).trim().split('\n');
    expect(summary).toBe(`float32 (${F}, ${N}, 3) ${pyFloat(exactSum(all))}`);
    expect((JSON.parse(json) as number[][][]).flat(2)).toEqual(Array.from(all));
  });

  it.skipIf(!hasNumpy)('numpy.load reads a streamed file with no rows', () => {
    const path = join(dir, 'empty.npy');
    const w = new NpyStreamWriter(path, '<f4', [10, 3], 500);
    expect(w.close()).toBe(0);
    expect(python(LOAD, path).trim().split('\n')[0]).toBe('float32 (0, 10, 3) 0.0');
  });

  it.skipIf(!hasNumpy)('numpy.load reads every dtype we write, with the right values', () => {
    const cases: [string, NpyTypedArray, number[]][] = [
      ['float64', Float64Array.from({ length: 12 }, (_, i) => i / 3 - 1), [4, 3]],
      ['int32', Int32Array.from({ length: 6 }, (_, i) => (i - 3) * 1000003), [6]],
      ['uint32', Uint32Array.from({ length: 8 }, (_, i) => 4294967295 - i * 17), [2, 2, 2]],
      ['uint8', Uint8Array.from({ length: 5 }, (_, i) => 250 + i), [5]],
      ['float32', new Float32Array(0), [0, 3]],
    ];
    for (const [name, data, shape] of cases) {
      const path = join(dir, `${name}.npy`);
      writeFileSync(path, encodeNpy(data, shape));
      const [summary, json] = python(LOAD, path).trim().split('\n');
      expect(summary.split(' ')[0]).toBe(name);
      expect(summary).toContain(pyTuple(shape));
      expect([JSON.parse(json)].flat(5)).toEqual(Array.from(data));
    }
  });
});

describe(`NPY written by NumPy${why}`, () => {
  // numpy.save of deterministic arrays; we decode them, compare values, and re-encode: our bytes
  // must equal numpy's (same header text and padding, same data). numpy writes uint8 as '|u1'
  // where we write '<u1', so that one is compared by value only.
  const SAVE = `
import sys, numpy
out = sys.argv[1]
cases = {
  'f4': numpy.arange(60, dtype='<f4').reshape(5, 4, 3) / 8,
  'f8': numpy.arange(10, dtype='<f8') / 3,
  'i4': numpy.arange(-6, 6, dtype='<i4').reshape(3, 4) * 7919,
  'u4': numpy.arange(6, dtype='<u4') * 700000001,
  'u1': numpy.arange(256, dtype='u1'),
  'f4_empty': numpy.zeros((0, 10, 3), dtype='<f4'),
  'f4_scalar': numpy.array(2.5, dtype='<f4'),
  'f4_big_leading': numpy.zeros((123456, 1), dtype='<f4'),
  'f4_many_dims': numpy.zeros((1,) * 14 + (2,), dtype='<f4'),
}
for k, v in cases.items():
    numpy.save(out + '/np_' + k + '.npy', v)
numpy.save(out + '/np_fortran.npy', numpy.asfortranarray(numpy.arange(6, dtype='<f4').reshape(2, 3)))
numpy.save(out + '/np_be.npy', numpy.arange(3, dtype='>f4'))
numpy.save(out + '/np_i8.npy', numpy.arange(3, dtype='<i8'))
with open(out + '/np_v2.npy', 'wb') as f:
    numpy.lib.format.write_array(f, numpy.arange(3, dtype='<f4'), version=(2, 0))
`;
  if (hasNumpy) python(SAVE, dir);

  const expected: Record<string, { shape: number[]; values: (i: number) => number }> = {
    f4: { shape: [5, 4, 3], values: (i) => i / 8 },
    f8: { shape: [10], values: (i) => i / 3 },
    i4: { shape: [3, 4], values: (i) => (i - 6) * 7919 },
    u4: { shape: [6], values: (i) => i * 700000001 },
    u1: { shape: [256], values: (i) => i },
    f4_empty: { shape: [0, 10, 3], values: () => 0 },
    f4_scalar: { shape: [], values: () => 2.5 },
    f4_big_leading: { shape: [123456, 1], values: () => 0 },
    // 15 dimensions: here NumPy's room for a 21-digit leading axis pushes the header from 128 to
    // 192 bytes, so this case checks that we pad exactly as it does.
    f4_many_dims: { shape: [...new Array(14).fill(1), 2], values: () => 0 },
  };

  for (const [key, { shape, values }] of Object.entries(expected)) {
    it.skipIf(!hasNumpy)(`decodes numpy.save output '${key}' and re-encodes it byte for byte`, () => {
      const file = readFileSync(join(dir, `np_${key}.npy`));
      const a = decodeNpy(file, `np_${key}.npy`);
      expect(a.shape).toEqual(shape);
      // f8 values are numpy's i/3 in float64, the same IEEE operation as ours.
      let firstWrong = -1;
      for (let i = 0; i < a.data.length && firstWrong < 0; i++) if (a.data[i] !== values(i)) firstWrong = i;
      expect(firstWrong).toBe(-1);
      const mine = encodeNpy(a.data, a.shape);
      if (key === 'u1') {
        const at = readNpyHeader(file).dataOffset;
        expect(mine.length).toBe(file.length);
        expect(firstDifference(mine.subarray(at), file.subarray(at))).toBe(-1);
      } else {
        expect(mine.length).toBe(file.length);
        expect(firstDifference(mine, file)).toBe(-1);
      }
    });
  }

  it.skipIf(!hasNumpy)('refuses what numpy can write but we do not support, with clear messages', () => {
    const load = (k: string) => () => decodeNpy(readFileSync(join(dir, `np_${k}.npy`)), `np_${k}.npy`);
    expect(load('fortran')).toThrow(NpyError);
    expect(load('fortran')).toThrow(/np_fortran\.npy is stored in Fortran/);
    expect(load('be')).toThrow(/np_be\.npy has dtype '>f4'/);
    expect(load('i8')).toThrow(/np_i8\.npy has dtype '<i8'/);
    expect(load('v2')).toThrow('np_v2.npy is NPY format version 2.0; only version 1.0 is supported');
  });
});

/** Index of the first differing byte, -1 when equal (vitest's deep equality is slow on MBs). */
function firstDifference(a: Uint8Array, b: Uint8Array): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) return i;
  return a.length === b.length ? -1 : n;
}

/** Python's repr of a float, for the sums printed above (integers print as "12.0"). */
function pyFloat(x: number): string {
  return Number.isInteger(x) ? x.toFixed(1) : String(x);
}

function pyTuple(shape: number[]): string {
  return shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
}
