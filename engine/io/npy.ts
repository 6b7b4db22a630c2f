// NPY format version 1.0: encode, decode and header building for the arrays of the run store.
// Pure (no Node, no DOM): the engine writes with it and the viewer reads with it.
//
// Layout, per the format description in NumPy's numpy/lib/format.py ("Format Version 1.0",
// also NEP 1, "A simple file format for NumPy arrays"):
//   6 bytes   magic "\x93NUMPY"
//   2 bytes   version: major 1, minor 0
//   2 bytes   HEADER_LEN, little-endian uint16
//   HEADER_LEN bytes  an ASCII Python dict literal with keys 'descr', 'fortran_order', 'shape',
//             terminated by '\n' and padded with spaces so that
//             len(magic) + 2 + 2 + HEADER_LEN is evenly divisible by 64 (ARRAY_ALIGN)
//   then the raw array data, C order, in the byte order 'descr' names.
// Because the data starts on a 64-byte boundary, a reader can lay a typed array over the file's
// own buffer without copying, which is what lets the viewer open 60 MB frame files cheaply.

export type NpyDtype = '<f4' | '<f8' | '<i4' | '<u1' | '<u4';
export type NpyTypedArray = Float32Array | Float64Array | Int32Array | Uint8Array | Uint32Array;

export interface NpyArray {
  dtype: NpyDtype;
  shape: number[];
  data: NpyTypedArray;
}

/** What a header says, and where its data begins (bytes from the start of the file). */
export interface NpyHeaderInfo {
  dtype: NpyDtype;
  shape: number[];
  dataOffset: number;
}

export class NpyError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'NpyError';
  }
}

/** Bytes per element, and the readable name used in messages. */
export const NPY_DTYPES: Record<NpyDtype, { bytes: number; name: string }> = {
  '<f4': { bytes: 4, name: 'float32' },
  '<f8': { bytes: 8, name: 'float64' },
  '<i4': { bytes: 4, name: 'int32' },
  '<u1': { bytes: 1, name: 'uint8' },
  '<u4': { bytes: 4, name: 'uint32' },
};

/** Builds the magic, version, length and padded header dict (everything before the data).
 *  padTo forces the total length (a multiple of 64, at least the natural length) so that a
 *  header can later be rewritten in place with a different shape, as the streaming writer does. */
export function npyHeader(dtype: NpyDtype, shape: number[], padTo?: number): Uint8Array {
  if (!(dtype in NPY_DTYPES)) throw new NpyError(`unsupported NPY dtype '${dtype}'`);
  for (const d of shape) {
    if (!Number.isSafeInteger(d) || d < 0) throw new NpyError(`bad NPY shape [${shape.join(', ')}]: dimensions must be non-negative integers`);
  }
  const dict = `{'descr': '${dtype}', 'fortran_order': False, 'shape': ${pythonTuple(shape)}, }`;
  // Like NumPy's writer, leave room for the leading dimension to grow to GROWTH_DIGITS digits so
  // any header can be rewritten in place, and put at least one space before the '\n' (NumPy
  // pads 1..64 spaces). Matching its padding makes our files byte-identical to numpy.save's.
  const growth = shape.length > 0 ? Math.max(0, GROWTH_DIGITS - String(shape[0]).length) : 0;
  const natural = roundUp(PREAMBLE + dict.length + growth + 2, ALIGN);
  const total = padTo ?? natural;
  if (total % ALIGN !== 0) throw new NpyError(`NPY header length ${total} is not a multiple of ${ALIGN}`);
  if (total < natural) throw new NpyError(`NPY header for shape ${pythonTuple(shape)} needs ${natural} bytes, more than the ${total} reserved`);
  const headerLen = total - PREAMBLE;
  if (headerLen > 0xffff) throw new NpyError(`NPY header of ${headerLen} bytes does not fit version 1.0's 16-bit length`);

  const out = new Uint8Array(total);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  out[8] = headerLen & 0xff;
  out[9] = headerLen >>> 8;
  for (let i = 0; i < dict.length; i++) out[PREAMBLE + i] = dict.charCodeAt(i);
  out.fill(0x20, PREAMBLE + dict.length, total - 1);
  out[total - 1] = 0x0a;
  return out;
}

/** The whole file: header followed by the array's bytes. The dtype follows the typed array. */
export function encodeNpy(data: NpyTypedArray, shape: number[]): Uint8Array {
  assertLittleEndianHost();
  const dtype = dtypeOf(data);
  const n = elementCount(shape);
  if (n !== data.length) {
    throw new NpyError(`shape [${shape.join(', ')}] holds ${n} elements but the array has ${data.length}`);
  }
  const header = npyHeader(dtype, shape);
  const out = new Uint8Array(header.length + data.byteLength);
  out.set(header, 0);
  out.set(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), header.length);
  return out;
}

/** Reads and checks the header only. `name` is used in error messages (e.g. "frames.npy"). */
export function readNpyHeader(buf: ArrayBuffer | Uint8Array, name = 'array.npy'): NpyHeaderInfo {
  const bytes = buf instanceof Uint8Array ? buf : new Uint8Array(buf);
  if (bytes.length < PREAMBLE || !MAGIC.every((b, i) => bytes[i] === b)) {
    throw new NpyError(`${name} is not an NPY file (missing the "\\x93NUMPY" magic at its start)`);
  }
  const major = bytes[6];
  const minor = bytes[7];
  if (major !== 1 || minor !== 0) {
    throw new NpyError(`${name} is NPY format version ${major}.${minor}; only version 1.0 is supported`);
  }
  const headerLen = bytes[8] | (bytes[9] << 8);
  const dataOffset = PREAMBLE + headerLen;
  if (bytes.length < dataOffset) {
    throw new NpyError(`${name} is truncated: its header needs ${dataOffset} bytes but the file has only ${bytes.length}`);
  }
  let text = '';
  for (let i = PREAMBLE; i < dataOffset; i++) text += String.fromCharCode(bytes[i]);
  return { ...parseHeaderDict(text, name), dataOffset };
}

/** Decodes a whole NPY file. The data is a view over `buf` when the data offset is aligned to
 *  the element size (always, for files written with 64-byte headers); otherwise a copy. */
export function decodeNpy(buf: ArrayBuffer | Uint8Array, name = 'array.npy'): NpyArray {
  assertLittleEndianHost();
  const bytes = buf instanceof Uint8Array ? buf : new Uint8Array(buf);
  const { dtype, shape, dataOffset } = readNpyHeader(bytes, name);
  const { bytes: itemSize, name: typeName } = NPY_DTYPES[dtype];
  const count = elementCount(shape);
  const need = count * itemSize;
  const have = bytes.length - dataOffset;
  if (have < need) {
    throw new NpyError(
      `${name} is truncated: header says ${shape.length ? shape.join('×') : 'a scalar'} ${typeName} (${need} bytes) but only ${have} bytes of data`,
    );
  }
  const Ctor = CTORS[dtype];
  const start = bytes.byteOffset + dataOffset;
  // Bytes past the end of the declared data are ignored, as NumPy's reader does.
  const data =
    start % itemSize === 0
      ? new Ctor(bytes.buffer as ArrayBuffer, start, count)
      : new Ctor(bytes.slice(dataOffset, dataOffset + need).buffer);
  return { dtype, shape, data };
}

/** The NPY dtype a typed array is stored as. */
export function dtypeOf(data: NpyTypedArray): NpyDtype {
  if (data instanceof Float32Array) return '<f4';
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Int32Array) return '<i4';
  if (data instanceof Uint32Array) return '<u4';
  if (data instanceof Uint8Array) return '<u1';
  throw new NpyError(`cannot store ${Object.prototype.toString.call(data)} as NPY`);
}

/** Product of the dimensions; 1 for a scalar (shape []). */
export function elementCount(shape: readonly number[]): number {
  let n = 1;
  for (const d of shape) n *= d;
  return n;
}

// --- private helpers ---

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // "\x93NUMPY"
const PREAMBLE = 10; // magic + version + uint16 length
const ALIGN = 64;
const GROWTH_DIGITS = 21; // NumPy's GROWTH_AXIS_MAX_DIGITS: digits of the largest 64-bit size

const CTORS = {
  '<f4': Float32Array,
  '<f8': Float64Array,
  '<i4': Int32Array,
  '<u1': Uint8Array,
  '<u4': Uint32Array,
} as const;

// NumPy writes '|u1' for single bytes (byte order does not apply); both mean the same.
const DESCR_ALIASES: Record<string, NpyDtype> = {
  '<f4': '<f4',
  '<f8': '<f8',
  '<i4': '<i4',
  '<u4': '<u4',
  '<u1': '<u1',
  '|u1': '<u1',
};

function roundUp(n: number, m: number): number {
  return Math.ceil(n / m) * m;
}

/** Python's repr of a tuple of ints: (), (5,), (2, 3). */
function pythonTuple(shape: readonly number[]): string {
  if (shape.length === 1) return `(${shape[0]},)`;
  return `(${shape.join(', ')})`;
}

/** Parses the header's Python dict literal for the three keys the format defines. Not a general
 *  Python parser: the format fixes the keys and their value kinds. */
function parseHeaderDict(text: string, name: string): Omit<NpyHeaderInfo, 'dataOffset'> {
  const bad = (what: string) => new NpyError(`${name} has a malformed NPY header (${what}): ${JSON.stringify(text.trim())}`);
  if (!/^\s*\{/.test(text) || !/\}\s*$/.test(text)) throw bad('not a dict');

  if (/['"]descr['"]\s*:\s*\[/.test(text)) {
    throw new NpyError(`${name} holds a structured dtype; only ${Object.keys(NPY_DTYPES).join(', ')} are supported`);
  }
  const descrMatch = /['"]descr['"]\s*:\s*['"]([^'"]*)['"]/.exec(text);
  if (!descrMatch) throw bad("no 'descr'");
  const dtype = DESCR_ALIASES[descrMatch[1]];
  if (!dtype) {
    throw new NpyError(`${name} has dtype '${descrMatch[1]}'; only ${Object.keys(NPY_DTYPES).join(', ')} are supported`);
  }

  const fortranMatch = /['"]fortran_order['"]\s*:\s*(True|False)/.exec(text);
  if (!fortranMatch) throw bad("no 'fortran_order'");
  if (fortranMatch[1] === 'True') {
    throw new NpyError(`${name} is stored in Fortran (column-major) order; only C order is supported`);
  }

  const shapeMatch = /['"]shape['"]\s*:\s*\(([^)]*)\)/.exec(text);
  if (!shapeMatch) throw bad("no 'shape'");
  const shape: number[] = [];
  for (const part of shapeMatch[1].split(',')) {
    const p = part.trim();
    if (p === '') continue;
    // Files written by Python 2 carry an 'L' suffix on longs.
    if (!/^\d+L?$/.test(p)) throw bad(`shape entry '${p}'`);
    const d = Number.parseInt(p, 10);
    if (!Number.isSafeInteger(d)) throw bad(`shape entry '${p}' too large`);
    shape.push(d);
  }
  return { dtype, shape };
}

const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

// Typed arrays use the host's byte order; every platform the project targets is little-endian,
// so rather than carry a byte-swapping path nobody exercises, refuse loudly.
function assertLittleEndianHost(): void {
  if (!LITTLE_ENDIAN_HOST) throw new NpyError('NPY reading and writing needs a little-endian host');
}
