// The query helpers the rule and the metrics share: nearestOnShaft (one shaft, a window of
// segments) on hand geometry, and nearestFromHint, which must give the same answer as a plain
// nearest-segment query whatever hint it gets: checked with fast-check against the
// brute-force index, itself checked against three.js Line3 in test/index/shaftIndex.test.ts.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { nearestFromHint, nearestOnShaft } from '../../engine/metrics/fasciculation.ts';
import { ShaftStore, createNearestSegment, createShaftIndex } from '../../engine/index/shaftIndex.ts';

type V3 = [number, number, number];

describe('nearestOnShaft', () => {
  // one shaft along x: points at x = 0, 10, …, 100 (y = z = 0)
  const store = new ShaftStore(1, 16);
  for (let i = 0; i <= 10; i++) store.append(0, 10 * i, 0, 0);
  const out = createNearestSegment();

  it('finds the nearest segment inside the window', () => {
    // (47, 3, 4): over segment 4 (x 40..50), distance √(3² + 4²) = 5
    expect(nearestOnShaft(store, 47, 3, 4, 10, 0, 5, 2, out)).toBe(true);
    expect([out.axon, out.segment, out.distance, out.px, out.py, out.pz]).toEqual([0, 4, 5, 47, 0, 0]);
  });

  it('misses what lies outside the window or beyond r', () => {
    expect(nearestOnShaft(store, 95, 1, 0, 10, 0, 2, 2, out)).toBe(false); // segments 0..4 only; x = 95 is 45 from x = 50
    expect(out.found).toBe(false);
    expect(nearestOnShaft(store, 47, 3, 4, 4.9, 0, 4, 2, out)).toBe(false); // 5 > 4.9
  });

  it('clips the window to the shaft', () => {
    expect(nearestOnShaft(store, 105, 0, 0, 10, 0, 9, 3, out)).toBe(true); // segments 6..9; tip at x = 100
    expect([out.segment, out.distance]).toEqual([9, 5]);
  });
});

describe('nearestFromHint gives the plain query’s answer for any hint', () => {
  const coord = (m: number) => fc.double({ min: -m, max: m, noNaN: true });
  const vec = (m: number) => fc.tuple(coord(m), coord(m), coord(m));
  const world = fc.record({
    shafts: fc.array(
      fc.tuple(vec(30), fc.array(vec(8), { minLength: 1, maxLength: 12 })),
      { minLength: 2, maxLength: 6 },
    ),
    query: vec(40),
    r: fc.double({ min: 0.5, max: 30, noNaN: true }),
    hintAxon: fc.nat(),
    hintSegment: fc.nat(),
    window: fc.integer({ min: 0, max: 3 }),
    self: fc.nat(),
  });

  it('same found flag and distance as brute force, on every index kind', () => {
    fc.assert(fc.property(world, (w) => {
      const n = w.shafts.length;
      const store = new ShaftStore(n, 4);
      const kinds = ['brute', 'hashgrid', 'rtree'] as const;
      const indexes = kinds.map((k) => createShaftIndex(k, { axons: n, maxPointsPerAxon: 4, cellSize: 7 }));
      w.shafts.forEach(([start, steps], a) => {
        const p: V3 = [...start];
        const add = () => { store.append(a, ...p); for (const ix of indexes) ix.append(a, ...p); };
        add();
        for (const d of steps) { p[0] += d[0]; p[1] += d[1]; p[2] += d[2]; add(); }
      });
      const self = w.self % n;
      const accept = (b: number) => b !== self;
      const ref = createNearestSegment();
      const found = indexes[0].nearestSegment(...w.query, w.r, accept, ref);
      // a hint is an accepted shaft (as it is in use: an earlier answer), any segment of it
      let hintAxon = w.hintAxon % n;
      if (hintAxon === self) hintAxon = (hintAxon + 1) % n;
      const hintSegment = w.hintSegment % (store.pointCount[hintAxon] - 1);
      for (const ix of indexes) {
        for (const [ha, hs] of [[hintAxon, hintSegment], [-1, 0]]) {
          const out = createNearestSegment();
          expect(nearestFromHint(ix, store, ...w.query, w.r, accept, ha, hs, w.window, out)).toBe(found);
          if (found) {
            expect(Math.abs(out.distance - ref.distance)).toBeLessThanOrEqual(1e-9 * (1 + ref.distance));
            expect(accept(out.axon)).toBe(true);
          }
        }
      }
    }), { numRuns: 400 });
  });
});
