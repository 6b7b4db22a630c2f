// The counting-sort point grid against exhaustive search: for random point clouds (some points
// outside the grid's bounds), random cell sizes and random queries, pointsWithin reports exactly
// the points whose Euclidean distance (Math.hypot, computed here independently) is ≤ r, each
// once, with that distance. Exhaustive search is the definition of the query itself.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type PointGrid, buildPointGrid, pointsWithin } from '../../engine/index/pointGrid.ts';

type V3 = [number, number, number];
const coord = (m: number) => fc.double({ min: -m, max: m, noNaN: true });
const vec = (m: number) => fc.tuple(coord(m), coord(m), coord(m));

interface Cloud {
  points: V3[];
  lo: V3;
  extent: V3;
  cellSize: number;
  queries: { near: number; off: V3; r: number }[];
}

const cloud: fc.Arbitrary<Cloud> = fc.record({
  points: fc.array(vec(120), { maxLength: 300 }),
  lo: vec(100),
  extent: fc.tuple(fc.double({ min: 0, max: 200, noNaN: true }), fc.double({ min: 0, max: 200, noNaN: true }), fc.double({ min: 0, max: 200, noNaN: true })),
  cellSize: fc.double({ min: 0.01, max: 80, noNaN: true }),
  queries: fc.array(fc.record({ near: fc.nat(), off: vec(30), r: fc.double({ min: 0, max: 60, noNaN: true }) }), { minLength: 1, maxLength: 15 }),
});

function check(ok: boolean, msg: string): void {
  if (!ok) throw new Error(msg);
}

function checkCloud(c: Cloud, reuse?: PointGrid): PointGrid {
  const xyz = new Float64Array(c.points.flat());
  const bounds = {
    minX: c.lo[0], minY: c.lo[1], minZ: c.lo[2],
    maxX: c.lo[0] + c.extent[0], maxY: c.lo[1] + c.extent[1], maxZ: c.lo[2] + c.extent[2],
  };
  const grid = buildPointGrid(xyz, c.points.length, c.cellSize, bounds, reuse);
  for (const q of c.queries) {
    const base: V3 = c.points.length ? c.points[q.near % c.points.length] : [0, 0, 0];
    const p: V3 = [base[0] + q.off[0], base[1] + q.off[1], base[2] + q.off[2]];
    const got = new Map<number, number>();
    pointsWithin(grid, ...p, q.r, (i, d) => {
      check(!got.has(i), `point ${i} visited twice`);
      got.set(i, d);
    });
    c.points.forEach((pt, i) => {
      const d = Math.hypot(pt[0] - p[0], pt[1] - p[1], pt[2] - p[2]);
      if (d < q.r - 1e-9) check(got.has(i), `missed point ${i} at ${d} < r = ${q.r}`);
      if (d > q.r + 1e-9) check(!got.has(i), `reported point ${i} at ${d} > r = ${q.r}`);
      if (got.has(i)) check(Math.abs(got.get(i)! - d) <= 1e-9, `point ${i}: distance ${got.get(i)} vs ${d}`);
    });
  }
  return grid;
}

describe('pointGrid vs exhaustive search', () => {
  it('random clouds and queries', () => {
    fc.assert(fc.property(cloud, (c) => void checkCloud(c)), { numRuns: 300 });
  });

  it('a grid reused across rebuilds (one per simulation step) stays exact', () => {
    fc.assert(
      fc.property(fc.array(cloud, { minLength: 2, maxLength: 4 }), (steps) => {
        let grid: PointGrid | undefined;
        for (const c of steps) grid = checkCloud(c, grid);
      }),
      { numRuns: 60 },
    );
  });

  it('a very fine cell over a large box is coarsened, not allocated cell by cell', () => {
    const xyz = new Float64Array([0, 0, 0, 999, 999, 999, 500, 500, 500]);
    const g = buildPointGrid(xyz, 3, 0.001, { minX: 0, minY: 0, minZ: 0, maxX: 1000, maxY: 1000, maxZ: 1000 });
    expect(g.nx * g.ny * g.nz).toBeLessThanOrEqual(4096);
    const seen: number[] = [];
    pointsWithin(g, 500, 500, 501, 1, (i) => seen.push(i)); // (500,500,500) is exactly 1 away
    expect(seen).toEqual([2]);
  });

  it('an empty grid reports nothing', () => {
    const g = buildPointGrid(new Float64Array(0), 0, 5, { minX: 0, minY: 0, minZ: 0, maxX: 10, maxY: 10, maxZ: 10 });
    let n = 0;
    pointsWithin(g, 5, 5, 5, 100, () => n++);
    expect(n).toBe(0);
  });
});
