// CSV as RFC 4180 ("Common Format and MIME Type for Comma-Separated Values (CSV) Files",
// IETF, 2005, section 2) defines it: records end in a line break, fields are separated by
// commas, a field containing a comma, a double quote or a line break is enclosed in double
// quotes, and a double quote inside such a field is written twice. Pure (no Node, no DOM).
//
// Numbers are written so that reading them back gives the same value: the default is the
// shortest decimal that round-trips float64 (what Number#toString produces). Values that came
// from a Float32Array would print with float64 noise that way (0.1f → 0.10000000149011612), so
// formatFloat32 is offered as a per-column formatter.

export type CsvCell = string | number | boolean;
export type CsvFormatter = (value: CsvCell) => string;

export interface CsvWriteOptions {
  /** Formatter per column, by header name; columns without one use the default. */
  format?: Partial<Record<string, CsvFormatter>>;
  /** Record terminator. RFC 4180 specifies CRLF; '\n' is accepted by every common reader. */
  eol?: '\r\n' | '\n';
}

export class CsvError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'CsvError';
  }
}

/** Builds a CSV text: a header record, then one record per row, each ending in `eol`. */
export function toCsv(header: string[], rows: CsvCell[][], options: CsvWriteOptions = {}): string {
  const eol = options.eol ?? '\r\n';
  const formatters = header.map((h) => options.format?.[h] ?? formatCell);
  const lines: string[] = [header.map(quoteField).join(',')];
  for (let r = 0; r < rows.length; r++) {
    const row = rows[r];
    // RFC 4180 §2.4: "Each line should contain the same number of fields throughout the file."
    if (row.length !== header.length) {
      throw new CsvError(`row ${r} has ${row.length} fields but the header has ${header.length}`);
    }
    const fields = new Array<string>(row.length);
    for (let c = 0; c < row.length; c++) fields[c] = quoteField(formatters[c](row[c]));
    lines.push(fields.join(','));
  }
  return lines.join(eol) + eol;
}

/** Parses CSV text whose first record is a header. Accepts CRLF, LF or CR line breaks, quoted
 *  fields with embedded commas, quotes and line breaks, a trailing line break or none, and a
 *  leading UTF-8 byte-order mark. Blank lines are skipped. */
export function parseCsv(text: string): { header: string[]; rows: string[][] } {
  const records = parseRecords(text);
  const header = records.shift() ?? [];
  return { header, rows: records };
}

/** Parses CSV text into one object per row, keyed by the header's names. */
export function parseCsvObjects(text: string): Record<string, string>[] {
  const { header, rows } = parseCsv(text);
  const seen = new Set<string>();
  for (const h of header) {
    if (seen.has(h)) throw new CsvError(`CSV header repeats the column name '${h}'`);
    seen.add(h);
  }
  return rows.map((row, r) => {
    if (row.length !== header.length) {
      throw new CsvError(`CSV row ${r + 1} has ${row.length} fields but the header has ${header.length}`);
    }
    const obj: Record<string, string> = {};
    for (let c = 0; c < header.length; c++) obj[header[c]] = row[c];
    return obj;
  });
}

/** Default cell formatting: numbers as the shortest text that reads back to the same float64
 *  (keeping the sign of -0), booleans as true/false, strings unchanged. */
export function formatCell(value: CsvCell): string {
  if (typeof value === 'number') return Object.is(value, -0) ? '-0' : String(value);
  return String(value);
}

/** The shortest decimal text that reads back (through float32 rounding) to the same float32
 *  value: Math.fround(0.1) gives "0.1", not "0.10000000149011612". Nine significant digits
 *  always suffice for float32 (IEEE 754-2008 §5.12.2, from memory; the
 *  tests check it against NumPy's shortest float32 repr), so the search is bounded. */
export function formatFloat32(value: CsvCell): string {
  if (typeof value !== 'number') return String(value);
  const x = Math.fround(value);
  if (!Number.isFinite(x) || x === 0) return formatCell(x);
  for (let p = 1; p <= 9; p++) {
    const y = Number(x.toPrecision(p));
    if (Math.fround(y) === x) return String(y);
  }
  return String(x); // unreachable for finite float32; kept so the function is total
}

// --- private helpers ---

const NEEDS_QUOTES = /[",\r\n]/;

// RFC 4180 §2.6–2.7: enclose in double quotes; double any quote inside.
function quoteField(field: string): string {
  return NEEDS_QUOTES.test(field) ? `"${field.replace(/"/g, '""')}"` : field;
}

/** A single pass state machine over the text. A quote that appears inside an unquoted field is
 *  kept literally (RFC 4180 forbids it, but spreadsheets write it and the meaning is plain);
 *  an unterminated quoted field or text after a closing quote is an error, because guessing
 *  there would silently shift columns. */
function parseRecords(text: string): string[][] {
  const records: string[][] = [];
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const n = text.length;
  let line = 1;
  let record: string[] = [];
  let field = '';
  let atRecordStart = true;

  const endRecord = () => {
    record.push(field);
    records.push(record);
    record = [];
    field = '';
    atRecordStart = true;
  };

  while (i < n) {
    const ch = text[i];
    if (ch === '\r' || ch === '\n') {
      const len = ch === '\r' && text[i + 1] === '\n' ? 2 : 1;
      if (atRecordStart) {
        // Blank line: no record (Python's csv module and pandas skip these too).
      } else {
        endRecord();
      }
      i += len;
      line++;
      continue;
    }
    atRecordStart = false;
    if (ch === ',') {
      record.push(field);
      field = '';
      i++;
      continue;
    }
    if (ch === '"' && field === '') {
      // Quoted field: runs to the next quote not followed by another quote.
      const startLine = line;
      i++;
      let closed = false;
      while (i < n) {
        const c = text[i];
        if (c === '"') {
          if (text[i + 1] === '"') {
            field += '"';
            i += 2;
            continue;
          }
          i++;
          closed = true;
          break;
        }
        if (c === '\n' || (c === '\r' && text[i + 1] !== '\n')) line++;
        field += c;
        i++;
      }
      if (!closed) throw new CsvError(`CSV quoted field starting on line ${startLine} is never closed`);
      if (i < n && text[i] !== ',' && text[i] !== '\r' && text[i] !== '\n') {
        throw new CsvError(`CSV line ${line}: unexpected '${text[i]}' after a closing quote`);
      }
      continue;
    }
    // Plain run up to the next delimiter.
    let j = i;
    while (j < n) {
      const c = text[j];
      if (c === ',' || c === '\r' || c === '\n') break;
      j++;
    }
    field += text.slice(i, j);
    i = j;
  }
  if (!atRecordStart) endRecord();
  return records;
}
