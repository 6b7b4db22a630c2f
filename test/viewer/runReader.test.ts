import { describe, it, expect, beforeAll } from 'vitest';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readRun, readManifest, fsLoader, fetchLoader, axonTable, RunReadError, type RunLoader } from '../../engine/io/runReader.ts';
import { makeRun } from '../fixtures/makeRun.ts';

// An NPY v1.0 file built byte by byte from the format description in NumPy's
// numpy/lib/format.py (magic "\x93NUMPY", version 1.0, little-endian uint16 header length,
// ASCII dict padded with spaces and ended by "\n" so the preamble is a multiple of 64 bytes),
// not with the project's own encoder, so the reader is checked against the published layout.
function handMadeNpy(shape: number[], values: number[]): ArrayBuffer {
  let dict = `{'descr': '<f4', 'fortran_order': False, 'shape': (${shape.join(', ')}${shape.length === 1 ? ',' : ''}), }`;
  const total = Math.ceil((10 + dict.length + 1) / 64) * 64;
  dict = dict.padEnd(total - 10 - 1, ' ') + '\n';
  const buf = new ArrayBuffer(total + values.length * 4);
  const u8 = new Uint8Array(buf);
  u8.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, dict.length & 0xff, dict.length >> 8]);
  for (let i = 0; i < dict.length; i++) u8[10 + i] = dict.charCodeAt(i);
  const dv = new DataView(buf, total);
  values.forEach((v, i) => dv.setFloat32(i * 4, v, true));
  return buf;
}

function memoryLoader(files: Record<string, string | ArrayBuffer>): RunLoader {
  const get = (rel: string) => {
    if (!(rel in files)) throw new RunReadError(rel, `${rel} is missing`);
    return files[rel];
  };
  return {
    bytes: async (rel) => get(rel) as ArrayBuffer,
    text: async (rel) => get(rel) as string,
  };
}

const manifest = (over: Record<string, unknown> = {}) =>
  JSON.stringify({
    format: 'axonloom-run', formatVersion: 1, axons: 1, frames: 2, frameTimesH: [0, 0.5],
    populations: [], fields: [], volume: { size: [10, 10, 10], voxel: 1 }, metrics: {}, ...over,
  });
const csv = 'id,population,source_u,source_v,start_step,end_x,end_y,end_z,status,steps,path_length_um\n0,p,0.25,0.75,0,4,5,6,reached,2,"1,5"\n';

describe('readRun on a hand-built run', () => {
  it('reads frames laid out [frames, axons, 3] as the NPY spec orders them (C order)', async () => {
    const run = await readRun(memoryLoader({ 'run.json': manifest(), 'frames.npy': handMadeNpy([2, 1, 3], [1, 2, 3, 4, 5, 6]), 'axons.csv': csv }));
    expect(run.frames.frames).toBe(2);
    expect(run.frames.axons).toBe(1);
    expect(Array.from(run.frames.data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(run.axons.numbers('source_u')[0]).toBe(0.25);
    // RFC 4180 §2.6: a quoted field may hold a comma; it is one field, not two.
    expect(run.axons.row(0).path_length_um).toBe('1,5');
  });

  it('names frames.npy when it is truncated', async () => {
    const full = handMadeNpy([2, 1, 3], [1, 2, 3, 4, 5, 6]);
    const cut = full.slice(0, full.byteLength - 5);
    const err = await readRun(memoryLoader({ 'run.json': manifest(), 'frames.npy': cut, 'axons.csv': csv })).catch((e) => e);
    expect(err).toBeInstanceOf(RunReadError);
    expect(err.file).toBe('frames.npy');
    expect(err.message).toMatch(/frames\.npy is truncated/);
  });

  it('refuses frames whose shape disagrees with run.json', async () => {
    const err = await readRun(memoryLoader({ 'run.json': manifest({ frames: 3, frameTimesH: [0, 1, 2] }), 'frames.npy': handMadeNpy([2, 1, 3], [1, 2, 3, 4, 5, 6]), 'axons.csv': csv })).catch((e) => e);
    expect(err.file).toBe('frames.npy');
    expect(err.message).toMatch(/2 frames of 1 axons but run\.json says 3 frames/);
  });

  it('refuses an axons.csv with a missing column or the wrong number of rows', () => {
    expect(() => axonTable('id,population\n0,p\n')).toThrow(/axons\.csv lacks the columns source_u/);
    expect(() => axonTable(csv, 2)).toThrow(/has 1 rows but run\.json says the run has 2 axons/);
  });

  it('refuses a manifest that is not a run or is from a newer format', async () => {
    await expect(readManifest(memoryLoader({ 'run.json': '{"format":"other"}' }))).rejects.toThrow(/not an axonloom run manifest/);
    await expect(readManifest(memoryLoader({ 'run.json': manifest({ formatVersion: 99 }) }))).rejects.toThrow(/format version 99/);
    await expect(readManifest(memoryLoader({ 'run.json': '{oops' }))).rejects.toThrow(/run\.json is not valid JSON/);
  });
});

describe('readRun on a fixture run directory', () => {
  let dir: string;
  beforeAll(() => {
    dir = join(mkdtempSync(join(tmpdir(), 'axl-reader-')), 'fx');
    makeRun(dir, { axons: 50, frames: 20 });
  });

  it('loads through the fs loader and agrees with the files', async () => {
    const run = await readRun(fsLoader(dir));
    expect(run.manifest.axons).toBe(50);
    expect(run.frames.data.length).toBe(20 * 50 * 3);
    // The last frame is where axons.csv says each axon ended (end_x, written from the same floats).
    const endX = run.axons.numbers('end_x');
    for (let a = 0; a < 50; a++) expect(run.frames.data[(19 * 50 + a) * 3]).toBe(Math.fround(endX[a]));
    const f = await run.field('lure');
    expect(f.data.length).toBe(f.info.shape.reduce((p, x) => p * x, 1));
    await expect(run.field('nothing')).rejects.toThrow(/no stored field for cue 'nothing'/);
  });

  it('names the missing file', async () => {
    const err = await readRun(fsLoader(join(dir, 'absent'))).catch((e) => e);
    expect(err).toBeInstanceOf(RunReadError);
    expect(err.file).toBe('run.json');
    expect(err.message).toMatch(/run\.json is missing/);
  });

  it('fetch loader reports HTTP failures with the file name', async () => {
    const files: Record<string, Buffer> = { 'run.json': readFileSync(join(dir, 'run.json')) };
    const fakeFetch = (async (url: string) => {
      const rel = String(url).replace('http://x/runs/fx/', '');
      const body = files[rel];
      return body ? new Response(new Uint8Array(body)) : new Response('nope', { status: 404 });
    }) as unknown as typeof fetch;
    const err = await readRun(fetchLoader('http://x/runs/fx', fakeFetch)).catch((e) => e);
    expect(err.file).toBe('frames.npy');
    expect(err.message).toMatch(/cannot fetch frames\.npy: HTTP 404/);
  });

  it('a truncated frames.npy on disk is reported, not read short', async () => {
    const bad = join(mkdtempSync(join(tmpdir(), 'axl-reader-')), 'cut');
    makeRun(bad, { axons: 10, frames: 5, truncateFramesBy: 7 });
    await expect(readRun(fsLoader(bad))).rejects.toThrow(/frames\.npy is truncated/);
  });
});
