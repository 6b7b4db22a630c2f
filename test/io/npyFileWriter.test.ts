import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { NpyError, decodeNpy, encodeNpy, npyHeader } from '../../engine/io/npy.ts';
import { NpyStreamWriter } from '../../engine/io/npyFileWriter.ts';

// The streamed file must be the same NPY 1.0 file (numpy/lib/format.py, "Format Version 1.0")
// that encodeNpy builds in one go, except for header padding sized for the largest shape.
// NumPy itself reads these files in npyNumpy.test.ts.

const dir = mkdtempSync(join(tmpdir(), 'axonloom-npyw-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function frame(f: number, n: number): Float32Array {
  const a = new Float32Array(n * 3);
  for (let i = 0; i < a.length; i++) a[i] = f * 1000 + i + 0.5;
  return a;
}

describe('NpyStreamWriter', () => {
  it('appends frames, rewrites the header with the real count, and decodes like encodeNpy', () => {
    const N = 50;
    const path = join(dir, 'frames.npy');
    const w = new NpyStreamWriter(path, '<f4', [N, 3], 1_000_000);
    const all = new Float32Array(13 * N * 3);
    for (let f = 0; f < 13; f++) {
      const fr = frame(f, N);
      all.set(fr, f * N * 3);
      w.append(fr);
    }
    expect(w.count).toBe(13);
    expect(w.close()).toBe(13);

    const bytes = readFileSync(path);
    const a = decodeNpy(bytes, 'frames.npy');
    expect(a.dtype).toBe('<f4');
    expect(a.shape).toEqual([13, N, 3]);
    expect(Array.from(a.data)).toEqual(Array.from(all));
    // Same header length as one built for the maximum shape; total size header + data exactly.
    const headerLen = npyHeader('<f4', [1_000_000, N, 3]).length;
    expect(statSync(path).size).toBe(headerLen + all.byteLength);
    // Same data bytes as the one-shot encoder.
    const oneShot = encodeNpy(all, [13, N, 3]);
    expect(Buffer.from(bytes.subarray(headerLen)).equals(Buffer.from(oneShot.subarray(oneShot.length - all.byteLength)))).toBe(true);
  });

  it('accepts several rows per append and a subarray view', () => {
    const path = join(dir, 'multi.npy');
    const w = new NpyStreamWriter(path, '<f4', [2, 3], 10);
    const buf = Float32Array.from({ length: 40 }, (_, i) => i);
    w.append(buf.subarray(4, 4 + 12)); // two rows of [2, 3], from a non-zero byte offset
    w.append(buf.subarray(0, 6));
    expect(w.close()).toBe(3);
    const a = decodeNpy(readFileSync(path));
    expect(a.shape).toEqual([3, 2, 3]);
    expect(Array.from(a.data)).toEqual([...Array.from(buf.subarray(4, 16)), ...Array.from(buf.subarray(0, 6))]);
  });

  it('writes a valid empty array when nothing was appended', () => {
    const path = join(dir, 'none.npy');
    const w = new NpyStreamWriter(path, '<f4', [10, 3], 500);
    expect(w.close()).toBe(0);
    const a = decodeNpy(readFileSync(path));
    expect(a.shape).toEqual([0, 10, 3]);
    expect(a.data.length).toBe(0);
  });

  it('leaves a file that reads as truncated until closed (a killed run is detectable)', () => {
    const path = join(dir, 'open.npy');
    const w = new NpyStreamWriter(path, '<f4', [4, 3], 100);
    w.append(frame(0, 4));
    expect(() => decodeNpy(readFileSync(path), 'open.npy')).toThrow(
      'open.npy is truncated: header says 100×4×3 float32 (4800 bytes) but only 48 bytes of data',
    );
    w.close();
    expect(decodeNpy(readFileSync(path)).shape).toEqual([1, 4, 3]);
  });

  it('refuses partial rows, too many rows, the wrong dtype and use after close', () => {
    const w = new NpyStreamWriter(join(dir, 'bad.npy'), '<f4', [2, 3], 2);
    expect(() => w.append(new Float32Array(5))).toThrow(/not a whole number of rows of 6/);
    expect(() => w.append(new Float64Array(6))).toThrow(/appending <f8 data to a <f4 array/);
    w.append(new Float32Array(12));
    expect(() => w.append(new Float32Array(6))).toThrow(/3 rows exceed the 2 reserved/);
    expect(w.close()).toBe(2);
    expect(() => w.append(new Float32Array(6))).toThrow(NpyError);
    expect(() => w.close()).toThrow(/already closed/);
  });

  it('streams other dtypes too', () => {
    const path = join(dir, 'u32.npy');
    const w = new NpyStreamWriter(path, '<u4', [], 5);
    w.append(Uint32Array.of(7, 8));
    w.append(Uint32Array.of(4294967295));
    expect(w.close()).toBe(3);
    const a = decodeNpy(readFileSync(path));
    expect(a).toMatchObject({ dtype: '<u4', shape: [3] });
    expect(Array.from(a.data)).toEqual([7, 8, 4294967295]);
  });
});
