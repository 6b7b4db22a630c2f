// Reading a run store directory (runFormat.ts) through a small loader interface, so the same
// code opens a run from disk in Node and over HTTP in the browser. Pure: no Node or DOM imports
// at module load (the fs loader imports node:fs lazily), so Vite can bundle it for the viewer.
//
// Every failure is a RunReadError that names the file it came from, because the person reading
// the message needs to know which of a run's files is missing, truncated or inconsistent.

import { decodeNpy, type NpyArray } from './npy.ts';
import { parseCsv } from './csv.ts';
import { RUN_FILES, RUN_FORMAT_VERSION, type FieldGridInfo, type RunManifest } from './runFormat.ts';

/** Where a run's files come from; `rel` is a path relative to the run directory. */
export interface RunLoader {
  bytes(rel: string): Promise<ArrayBuffer>;
  text(rel: string): Promise<string>;
}

export class RunReadError extends Error {
  /** the run file the problem is in, relative to the run directory */
  readonly file: string;
  constructor(file: string, message: string) {
    super(message);
    this.name = 'RunReadError';
    this.file = file;
  }
}

/** axons.csv as columns: text as read, and a numeric view of each column (NaN where empty or
 *  not a number), so the viewer can filter and colour without re-parsing. */
export interface AxonTable {
  header: string[];
  rows: string[][];
  count: number;
  has(column: string): boolean;
  /** the column's values as numbers; throws RunReadError if the column is absent */
  numbers(column: string): Float64Array;
  /** the column's values as text; throws RunReadError if the column is absent */
  strings(column: string): string[];
  /** one row as { column: text } */
  row(index: number): Record<string, string>;
}

/** frames.npy: positions in µm, frame f, axon a at data[(f·axons + a)·3 + 0..2]. */
export interface FramesArray {
  data: Float32Array;
  frames: number;
  axons: number;
}

export interface FieldGrid {
  info: FieldGridInfo;
  data: Float32Array;
}

export interface LoadedRun {
  manifest: RunManifest;
  frames: FramesArray;
  axons: AxonTable;
  /** the fields listed in the manifest, by cue name */
  fieldInfos: FieldGridInfo[];
  /** loads fields/<cue>.npy on first use and keeps it */
  field(cue: string): Promise<FieldGrid>;
}

/** Columns every axons.csv has (run store format, version 1). */
export const REQUIRED_AXON_COLUMNS = [
  'id', 'population', 'source_u', 'source_v', 'start_step', 'end_x', 'end_y', 'end_z', 'status', 'steps', 'path_length_um',
] as const;

/** Reads run.json, frames.npy and axons.csv, checks they agree with each other, and returns them
 *  with a lazy field loader. */
export async function readRun(loader: RunLoader): Promise<LoadedRun> {
  const manifest = await readManifest(loader);
  const [framesBuf, axonsText] = await Promise.all([
    load(loader, RUN_FILES.frames, 'bytes'),
    load(loader, RUN_FILES.axons, 'text'),
  ]);
  const frames = framesFrom(decode(framesBuf, RUN_FILES.frames), manifest);
  const axons = axonTable(axonsText, manifest.axons);

  const fieldInfos = Array.isArray(manifest.fields) ? manifest.fields : [];
  const cache = new Map<string, Promise<FieldGrid>>();
  const field = (cue: string): Promise<FieldGrid> => {
    let p = cache.get(cue);
    if (!p) {
      p = loadField(loader, fieldInfos, cue);
      cache.set(cue, p);
      p.catch(() => cache.delete(cue)); // a failed load may be retried
    }
    return p;
  };
  return { manifest, frames, axons, fieldInfos, field };
}

/** run.json alone, checked for the fields a reader depends on. */
export async function readManifest(loader: RunLoader): Promise<RunManifest> {
  const file = RUN_FILES.manifest;
  const text = await load(loader, file, 'text');
  let m: unknown;
  try {
    m = JSON.parse(text);
  } catch (e) {
    throw new RunReadError(file, `${file} is not valid JSON: ${(e as Error).message}`);
  }
  if (!isObject(m) || m.format !== 'axonloom-run') {
    throw new RunReadError(file, `${file} is not an axonloom run manifest (its "format" is not "axonloom-run")`);
  }
  if (typeof m.formatVersion !== 'number' || m.formatVersion > RUN_FORMAT_VERSION) {
    throw new RunReadError(file, `${file} has run format version ${String(m.formatVersion)}; this reader understands up to ${RUN_FORMAT_VERSION}`);
  }
  for (const key of ['axons', 'frames'] as const) {
    if (!Number.isInteger(m[key]) || (m[key] as number) < 0) throw new RunReadError(file, `${file}: "${key}" must be a non-negative whole number`);
  }
  if (!Array.isArray(m.frameTimesH) || m.frameTimesH.length !== m.frames) {
    throw new RunReadError(file, `${file}: "frameTimesH" must list one time per frame (${String(m.frames)})`);
  }
  if (!Array.isArray(m.populations)) throw new RunReadError(file, `${file}: "populations" must be a list`);
  if (!isObject(m.volume) || !Array.isArray(m.volume.size) || m.volume.size.length !== 3) {
    throw new RunReadError(file, `${file}: "volume.size" must be three lengths in µm`);
  }
  return m as unknown as RunManifest;
}

/** Loader for a run directory served over HTTP; `baseUrl` ends at the run directory. */
export function fetchLoader(baseUrl: string, fetchFn: typeof fetch = fetch): RunLoader {
  const base = baseUrl.endsWith('/') ? baseUrl : baseUrl + '/';
  const get = async (rel: string) => {
    const url = base + rel.split('/').map(encodeURIComponent).join('/');
    let res: Response;
    try {
      res = await fetchFn(url);
    } catch (e) {
      throw new RunReadError(rel, `cannot fetch ${rel}: ${(e as Error).message}`);
    }
    if (!res.ok) throw new RunReadError(rel, `cannot fetch ${rel}: HTTP ${res.status}${res.status === 404 ? ' (no such file in the run)' : ''}`);
    return res;
  };
  return {
    bytes: async (rel) => (await get(rel)).arrayBuffer(),
    text: async (rel) => (await get(rel)).text(),
  };
}

/** Loader for a run directory on disk (Node only; node:fs is imported on first use). */
export function fsLoader(dir: string): RunLoader {
  // A variable specifier keeps bundlers from pulling node:fs into the browser build.
  const fsModule = 'node:fs/promises';
  const fs = import(/* @vite-ignore */ fsModule) as Promise<typeof import('node:fs/promises')>;
  const path = (rel: string) => (dir.endsWith('/') ? dir : dir + '/') + rel;
  const wrap = async <T>(rel: string, f: (p: string) => Promise<T>): Promise<T> => {
    try {
      return await f(path(rel));
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      throw new RunReadError(rel, code === 'ENOENT' ? `${rel} is missing from the run directory ${dir}` : `cannot read ${rel}: ${(e as Error).message}`);
    }
  };
  return {
    bytes: (rel) => wrap(rel, async (p) => {
      const b = await (await fs).readFile(p);
      // A Node Buffer may share a pooled ArrayBuffer; hand out exactly the file's bytes.
      return b.byteOffset === 0 && b.byteLength === b.buffer.byteLength ? (b.buffer as ArrayBuffer) : (b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer);
    }),
    text: (rel) => wrap(rel, async (p) => (await fs).readFile(p, 'utf8')),
  };
}

/** Builds the table view of axons.csv text; `expected` is the manifest's axon count. */
export function axonTable(text: string, expected?: number): AxonTable {
  const file = RUN_FILES.axons;
  let parsed: { header: string[]; rows: string[][] };
  try {
    parsed = parseCsv(text);
  } catch (e) {
    throw new RunReadError(file, `${file}: ${(e as Error).message}`);
  }
  const { header, rows } = parsed;
  const missing = REQUIRED_AXON_COLUMNS.filter((c) => !header.includes(c));
  if (missing.length) throw new RunReadError(file, `${file} lacks the column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}`);
  if (expected !== undefined && rows.length !== expected) {
    throw new RunReadError(file, `${file} has ${rows.length} rows but run.json says the run has ${expected} axons`);
  }
  for (let r = 0; r < rows.length; r++) {
    if (rows[r].length !== header.length) {
      throw new RunReadError(file, `${file} row ${r + 1} has ${rows[r].length} fields but the header has ${header.length}`);
    }
  }
  const index = new Map(header.map((h, i) => [h, i]));
  const numCache = new Map<string, Float64Array>();
  const col = (name: string): number => {
    const c = index.get(name);
    if (c === undefined) throw new RunReadError(file, `${file} has no column '${name}'`);
    return c;
  };
  return {
    header,
    rows,
    count: rows.length,
    has: (name) => index.has(name),
    numbers(name) {
      let out = numCache.get(name);
      if (!out) {
        const c = col(name);
        out = new Float64Array(rows.length);
        for (let r = 0; r < rows.length; r++) out[r] = parseNumber(rows[r][c]);
        numCache.set(name, out);
      }
      return out;
    },
    strings(name) {
      const c = col(name);
      return rows.map((row) => row[c]);
    },
    row(i) {
      const o: Record<string, string> = {};
      header.forEach((h, c) => (o[h] = rows[i][c]));
      return o;
    },
  };
}

// --- private helpers ---

async function load(loader: RunLoader, rel: string, kind: 'bytes'): Promise<ArrayBuffer>;
async function load(loader: RunLoader, rel: string, kind: 'text'): Promise<string>;
async function load(loader: RunLoader, rel: string, kind: 'bytes' | 'text'): Promise<ArrayBuffer | string> {
  try {
    return kind === 'bytes' ? await loader.bytes(rel) : await loader.text(rel);
  } catch (e) {
    if (e instanceof RunReadError) throw e;
    throw new RunReadError(rel, `cannot read ${rel}: ${(e as Error).message}`);
  }
}

function decode(buf: ArrayBuffer, file: string): NpyArray {
  try {
    return decodeNpy(buf, file);
  } catch (e) {
    throw new RunReadError(file, (e as Error).message);
  }
}

function framesFrom(arr: NpyArray, m: RunManifest): FramesArray {
  const file = RUN_FILES.frames;
  if (arr.dtype !== '<f4') throw new RunReadError(file, `${file} holds ${arr.dtype}; expected float32 ('<f4')`);
  const [f, n, three] = arr.shape;
  if (arr.shape.length !== 3 || three !== 3) {
    throw new RunReadError(file, `${file} has shape [${arr.shape.join(', ')}]; expected [frames, axons, 3]`);
  }
  if (f !== m.frames || n !== m.axons) {
    throw new RunReadError(file, `${file} has ${f} frames of ${n} axons but run.json says ${m.frames} frames of ${m.axons} axons`);
  }
  return { data: arr.data as Float32Array, frames: f, axons: n };
}

async function loadField(loader: RunLoader, infos: FieldGridInfo[], cue: string): Promise<FieldGrid> {
  const info = infos.find((i) => i.cue === cue);
  if (!info) throw new RunReadError(RUN_FILES.manifest, `the run has no stored field for cue '${cue}' (fields: ${infos.map((i) => i.cue).join(', ') || 'none'})`);
  if (typeof info.file !== 'string' || info.file.startsWith('/') || info.file.split('/').includes('..')) {
    throw new RunReadError(RUN_FILES.manifest, `run.json names an unsafe field file '${String(info.file)}' for cue '${cue}'`);
  }
  const arr = decode(await load(loader, info.file, 'bytes'), info.file);
  if (arr.dtype !== '<f4') throw new RunReadError(info.file, `${info.file} holds ${arr.dtype}; expected float32`);
  const expectDims = info.space === 'volume' ? 3 : 2;
  if (arr.shape.length !== expectDims || arr.shape.some((d, i) => d !== info.shape[i])) {
    throw new RunReadError(info.file, `${info.file} has shape [${arr.shape.join(', ')}] but run.json says [${info.shape.join(', ')}]`);
  }
  return { info, data: arr.data as Float32Array };
}

function parseNumber(s: string): number {
  if (s === '') return NaN;
  if (s === 'true') return 1;
  if (s === 'false') return 0;
  const x = Number(s);
  return Number.isNaN(x) ? NaN : x;
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}
