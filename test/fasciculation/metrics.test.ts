// metrics.fasciculation: fasciculatedFraction, bundleCount, meanBundleSize on hand geometry
// (straight shafts, Pythagoras) and, for random shafts, against an oracle written here on
// three.js Line3.closestPointToPoint (npm reference library) that measures every segment pair.
import fc from 'fast-check';
import { Line3, Vector3 } from 'three';
import { describe, expect, it } from 'vitest';
import { fasciculationMetrics } from '../../engine/metrics/fasciculation.ts';
import { ShaftStore, createShaftIndex, type ShaftIndexKind } from '../../engine/index/shaftIndex.ts';

type V3 = [number, number, number];

/** Store and index holding the given polylines as shafts 0..n−1. */
function build(shafts: V3[][], kind: ShaftIndexKind = 'brute', cellSize = 10) {
  const store = new ShaftStore(shafts.length, 4);
  const index = createShaftIndex(kind, { axons: shafts.length, maxPointsPerAxon: 4, cellSize });
  shafts.forEach((pts, a) => pts.forEach((p) => { store.append(a, ...p); index.append(a, ...p); }));
  return { store, index };
}

/** A straight shaft from (x0, y, 0) to (x1, y, 0) in `n` equal segments. */
function line(x0: number, x1: number, y: number, n: number, z = 0): V3[] {
  return Array.from({ length: n + 1 }, (_, i) => [x0 + ((x1 - x0) * i) / n, y, z] as V3);
}

function metrics(shafts: V3[][], r: number, adheres = (_a: number, _b: number) => true, linkShare?: number, kind: ShaftIndexKind = 'brute') {
  const { store, index } = build(shafts, kind);
  return fasciculationMetrics({ shafts: store, index, radius: new Float64Array(shafts.length).fill(r), adheres, linkShare });
}

describe('fasciculatedFraction on hand geometry', () => {
  it('two parallel shafts 10 µm apart, r_f = 15: all of both is fasciculated, one bundle of 2', () => {
    const m = metrics([line(0, 100, 0, 10), line(0, 100, 10, 10)], 15);
    expect(m.fasciculatedFraction).toBe(1);
    expect(m.shaftLengthUm).toBeCloseTo(200, 12);
    expect([m.bundleCount, m.meanBundleSize, m.largestBundle, m.bundledAxonFraction]).toEqual([1, 2, 2, 1]);
  });

  it('20 µm apart, r_f = 15: nothing is fasciculated, no bundle', () => {
    const m = metrics([line(0, 100, 0, 10), line(0, 100, 20, 10)], 15);
    expect(m.fasciculatedFraction).toBe(0);
    expect([m.bundleCount, m.meanBundleSize, m.bundledAxonFraction]).toEqual([0, 0, 0]);
  });

  it('a lone shaft is never fasciculated onto itself', () => {
    const zigzag: V3[] = [[0, 0, 0], [10, 0, 0], [0, 1, 0], [10, 1, 0]];
    expect(metrics([zigzag], 15).fasciculatedFraction).toBe(0);
  });

  it('half-overlapping shafts: 6 of 10 midpoints of each within r_f', () => {
    // A: x 0..100 at y = 0; B: x 50..150 at y = 5; r_f = 10; midpoints every 10 µm from 5.
    // A's midpoint x is within r_f of B when x ≥ 50 − √(10² − 5²) = 41.34 → 45, 55, …, 95: 6.
    // B's midpoint x is within r_f of A when x ≤ 100 + 8.66 = 108.66 → 55, …, 105: 6.
    const m = metrics([line(0, 100, 0, 10), line(50, 150, 5, 10)], 10);
    expect(m.fasciculatedFraction).toBeCloseTo(0.6, 12);
    expect(m.bundleCount).toBe(1); // B is the nearest along 60 % of each, ≥ the default 25 %
    expect(metrics([line(0, 100, 0, 10), line(50, 150, 5, 10)], 10, undefined, 0.7).bundleCount).toBe(0);
  });

  it('adhesion is directional: only A adheres to B, so only A’s share counts', () => {
    const m = metrics([line(0, 100, 0, 10), line(50, 150, 5, 10)], 10, (a) => a === 0);
    expect(m.fasciculatedFraction).toBeCloseTo(0.3, 12); // 60 of 200 µm
    expect(m.bundleCount).toBe(1); // A links to B (nearest along 60 % of A); links are undirected
  });

  it('bundles are connected components: a chain of three plus a stray', () => {
    // A–B and B–C 10 µm apart, A–C 20 µm (> r_f = 15): one bundle {A, B, C}; D far away.
    const m = metrics([line(0, 100, 0, 10), line(0, 100, 10, 10), line(0, 100, 20, 10), line(0, 100, 200, 10)], 15);
    expect([m.bundleCount, m.meanBundleSize, m.largestBundle]).toEqual([1, 3, 3]);
    expect(m.bundledAxonFraction).toBe(0.75);
    expect(m.fasciculatedFraction).toBeCloseTo(0.75, 12); // D's 100 µm of 400 is alone
  });

  it('a shaft crossed in passing links nothing; the partner run along is kept', () => {
    // A: x 0..100 at y = 0; B parallel at y = 8 (r_f = 10); C along z from −200 to 200 at
    // x = 50, y = 0, crossing A. A runs along B all the way (8 < 10, kept even where C is
    // nearer); C is within r_f of A or B only for |z| < 10 (20 of 400 µm, 5 % < 10 %).
    const C = Array.from({ length: 41 }, (_, i) => [50, 0, -200 + 10 * i] as V3);
    const m = metrics([line(0, 100, 0, 10), line(0, 100, 8, 10), C], 10);
    expect([m.bundleCount, m.meanBundleSize]).toEqual([1, 2]);
    expect(m.bundledAxonFraction).toBeCloseTo(2 / 3, 12);
    // C's two segments either side of z = 0 (midpoints z = ±5, within 10 of A and of B: √(8² + 5²) = 9.4)
    expect(m.fasciculatedLengthUm).toBeCloseTo(200 + 20, 9);
  });

  it('two separate pairs: two bundles of mean size 2', () => {
    const m = metrics([line(0, 100, 0, 10), line(0, 100, 5, 10), line(0, 100, 100, 10), line(0, 100, 105, 10)], 10);
    expect([m.bundleCount, m.meanBundleSize]).toEqual([2, 2]);
  });
});

describe('fasciculatedFraction on random shafts vs a three.js oracle', () => {
  const coord = (m: number) => fc.double({ min: -m, max: m, noNaN: true });
  const vec = (m: number) => fc.tuple(coord(m), coord(m), coord(m));
  const shafts = fc.array(
    fc.tuple(vec(30), fc.array(vec(6), { minLength: 1, maxLength: 15 })).map(([s, steps]) => {
      const pts: V3[] = [s];
      for (const d of steps) { const p = pts[pts.length - 1]; pts.push([p[0] + d[0], p[1] + d[1], p[2] + d[2]]); }
      // the store keeps float32 points (engine/index/shaftIndex.ts): the oracle measures those
      return pts.map((p) => p.map(Math.fround) as V3);
    }),
    { minLength: 1, maxLength: 8 },
  );
  const line3 = new Line3(), q = new Vector3(), c = new Vector3();

  function oracle(sh: V3[][], r: number, adheres: (a: number, b: number) => boolean) {
    let total = 0, near = 0;
    sh.forEach((pts, a) => {
      for (let s = 0; s + 1 < pts.length; s++) {
        const A = new Vector3(...pts[s]), B = new Vector3(...pts[s + 1]);
        const len = A.distanceTo(B);
        if (len === 0) continue;
        total += len;
        q.copy(A).add(B).multiplyScalar(0.5);
        let hit = false;
        sh.forEach((other, b) => {
          if (b === a || !adheres(a, b)) return;
          for (let t = 0; t + 1 < other.length && !hit; t++) {
            line3.start.set(...other[t]); line3.end.set(...other[t + 1]);
            // away from the boundary by 1e-9 so float rounding cannot decide the case
            if (line3.closestPointToPoint(q, true, c).distanceTo(q) <= r - 1e-9) hit = true;
          }
        });
        if (hit) near += len;
      }
    });
    return total > 0 ? near / total : 0;
  }

  it('every index gives the oracle’s share (to rounding at the r_f boundary)', () => {
    fc.assert(fc.property(shafts, fc.double({ min: 1, max: 20, noNaN: true }), fc.nat(), (sh, r, mask) => {
      const adheres = (a: number, b: number) => ((mask >>> ((a * 8 + b) % 31)) & 1) === 1;
      const ref = oracle(sh, r, adheres);
      for (const kind of ['brute', 'hashgrid', 'rtree'] as const) {
        const m = metrics(sh, r, adheres, undefined, kind);
        // ≥: the oracle's strict margin only drops cases within 1e-9 of r_f
        expect(m.fasciculatedFraction).toBeGreaterThanOrEqual(ref - 1e-9);
        expect(m.fasciculatedFraction).toBeLessThanOrEqual(1);
      }
      const a = metrics(sh, r, adheres, undefined, 'brute').fasciculatedFraction;
      expect(metrics(sh, r, adheres, undefined, 'hashgrid').fasciculatedFraction).toBe(a);
      expect(metrics(sh, r, adheres, undefined, 'rtree').fasciculatedFraction).toBe(a);
      // and from above: the oracle with r_f + 1e-9 bounds every index's share
      expect(a).toBeLessThanOrEqual(oracle(sh, r + 2e-9, adheres) + 1e-12);
    }), { numRuns: 150 });
  });
});
