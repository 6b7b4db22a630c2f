import { describe, expect, it } from 'vitest';
import { SWC_TYPE_AXON, axonsToSwc, type AxonPath } from '../../engine/io/swc.ts';

// Structure checked against the SWC definition of Cannon et al., J. Neurosci. Methods 84 (1998)
// 49–54: one sample per line "n T x y z R P", '#' comment lines, type 2 = axon, parent -1 for a
// root. That ids are unique in a file and a parent is listed before its child is how SWC
// readers resolve trees (common practice, no source).

interface Sample {
  n: number;
  T: number;
  x: number;
  y: number;
  z: number;
  R: number;
  P: number;
}

function readSwc(text: string): { comments: string[]; samples: Sample[] } {
  const comments: string[] = [];
  const samples: Sample[] = [];
  for (const line of text.split('\n')) {
    if (line === '') continue;
    if (line.startsWith('#')) {
      comments.push(line);
      continue;
    }
    const cols = line.trim().split(/\s+/);
    expect(cols).toHaveLength(7);
    const [n, T, x, y, z, R, P] = cols.map(Number);
    for (const v of [n, T, x, y, z, R, P]) expect(Number.isFinite(v)).toBe(true);
    samples.push({ n, T, x, y, z, R, P });
  }
  return { comments, samples };
}

const paths: AxonPath[] = [
  { axonId: 7, points: Float32Array.of(0, 0, 0, 1, 0, 0, 2, 1, 0), count: 3 },
  { axonId: 3, points: Float64Array.of(10, 20, 30, 11, 21, 31, 99, 99, 99), count: 2 }, // buffer longer than count
  { axonId: 9, points: new Float32Array(6), count: 0 }, // nothing grown: no tree
  { axonId: 4, points: Float32Array.of(Math.fround(0.1), 5, -5), count: 1 }, // a root alone
];

describe('axonsToSwc (SWC, Cannon et al. 1998)', () => {
  const text = axonsToSwc(paths, 0.5, ['axonloom run "demo"', 'second line\nthird line']);
  const { comments, samples } = readSwc(text);

  it('writes seven numeric columns per sample, type 2 (axon), the given radius', () => {
    expect(samples).toHaveLength(3 + 2 + 1);
    for (const s of samples) {
      expect(s.T).toBe(SWC_TYPE_AXON);
      expect(s.T).toBe(2);
      expect(s.R).toBe(0.5);
    }
  });

  it('numbers samples 1..N uniquely across the file, each parent listed before its child', () => {
    expect(samples.map((s) => s.n)).toEqual([1, 2, 3, 4, 5, 6]);
    const seen = new Set<number>();
    for (const s of samples) {
      if (s.P !== -1) expect(seen.has(s.P)).toBe(true);
      seen.add(s.n);
    }
  });

  it('makes one tree per grown axon: one root each, a chain in growth order', () => {
    const roots = samples.filter((s) => s.P === -1).map((s) => s.n);
    expect(roots).toEqual([1, 4, 6]);
    expect(samples.map((s) => s.P)).toEqual([-1, 1, 2, -1, 4, -1]);
    // Trees are labelled by axon id in comments, in the same order; axon 9 has none.
    expect(comments.filter((c) => c.startsWith('# axon '))).toEqual(['# axon 7', '# axon 3', '# axon 4']);
  });

  it('writes the coordinates, float32 ones without float64 noise', () => {
    expect(samples.map((s) => [s.x, s.y, s.z])).toEqual([
      [0, 0, 0],
      [1, 0, 0],
      [2, 1, 0],
      [10, 20, 30],
      [11, 21, 31],
      [0.1, 5, -5],
    ]);
    expect(text).toContain('6 2 0.1 5 -5 0.5 -1');
  });

  it('puts the comment lines first, each prefixed with #', () => {
    expect(text.startsWith('# axonloom run "demo"\n# second line\n# third line\n')).toBe(true);
  });

  it('rejects counts beyond the buffer and non-finite points or radius', () => {
    expect(() => axonsToSwc([{ axonId: 1, points: new Float32Array(3), count: 2 }], 1)).toThrow(/count 2 does not fit 1 points/);
    expect(() => axonsToSwc([{ axonId: 1, points: Float32Array.of(0, NaN, 0), count: 1 }], 1)).toThrow(/not finite/);
    expect(() => axonsToSwc([], -1)).toThrow(RangeError);
    expect(readSwc(axonsToSwc([], 1)).samples).toEqual([]);
  });
});
