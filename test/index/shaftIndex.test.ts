// The R-tree and hash-grid shaft indexes against exhaustive search. Two references:
//  - the project's brute-force index (identical answers: same found flag, same nearest
//    distance within 1e-9, the same set of segments within r; ties compared by distance);
//  - an oracle written here on three.js Line3.closestPointToPoint (npm reference library)
//    over the test's own copy of the shafts, which also checks the brute-force index itself.
// Shafts are random walks grown round-robin (as the engine grows all axons per step), with
// zero-length and long steps mixed in, and queries run at three stages of growth.
import fc from 'fast-check';
import { Line3, Vector3 } from 'three';
import { describe, expect, it } from 'vitest';
import {
  type ShaftIndex,
  type ShaftIndexKind,
  createNearestSegment,
  createShaftIndex,
} from '../../engine/index/shaftIndex.ts';

type V3 = [number, number, number];

interface Scene {
  starts: V3[];
  steps: V3[][];
  optAxons: number;
  optMaxPoints: number;
  cellSize: number;
  chunkSize: number;
  projection: 'xy' | 'xz' | 'yz';
  queries: { axon: number; point: number; off: V3; r: number; acceptMask: number }[];
}

const coord = (m: number) => fc.double({ min: -m, max: m, noNaN: true });
const vec = (m: number) => fc.tuple(coord(m), coord(m), coord(m));
// Mostly growth-cone sized steps; some zero-length (degenerate) and some long (multi-cell,
// fat-box regrowth in the R-tree).
const step = fc.oneof(
  { weight: 8, arbitrary: vec(4) },
  { weight: 1, arbitrary: fc.constant<V3>([0, 0, 0]) },
  { weight: 1, arbitrary: vec(40) },
);

const scene: fc.Arbitrary<Scene> = fc
  .integer({ min: 1, max: 8 })
  .chain((n) =>
    fc.record({
      starts: fc.array(vec(60), { minLength: n, maxLength: n }),
      steps: fc.array(fc.array(step, { maxLength: 30 }), { minLength: n, maxLength: n }),
      optAxons: fc.integer({ min: 1, max: n }),
      optMaxPoints: fc.integer({ min: 1, max: 40 }),
      cellSize: fc.double({ min: 0.5, max: 40, noNaN: true }),
      chunkSize: fc.integer({ min: 1, max: 16 }),
      projection: fc.constantFrom<('xy' | 'xz' | 'yz')[]>('xy', 'xz', 'yz'),
      queries: fc.array(
        fc.record({
          axon: fc.nat(),
          point: fc.nat(),
          off: vec(25),
          r: fc.oneof(fc.double({ min: 0, max: 30, noNaN: true }), fc.constant(1e4)),
          acceptMask: fc.nat(),
        }),
        { minLength: 1, maxLength: 12 },
      ),
    }),
  );

const KINDS: ShaftIndexKind[] = ['brute', 'rtree', 'hashgrid'];
const line = new Line3(), pv = new Vector3(), qv = new Vector3();

/** Three.js distance from p to segment s of a shaft. */
function refDistance(shaft: V3[], s: number, p: V3): { d: number; q: V3 } {
  line.start.set(...shaft[s]);
  line.end.set(...shaft[s + 1]);
  pv.set(...p);
  line.closestPointToPoint(pv, true, qv);
  return { d: qv.distanceTo(pv), q: [qv.x, qv.y, qv.z] };
}

function runScene(sc: Scene): void {
  const opts = {
    axons: sc.optAxons, maxPointsPerAxon: sc.optMaxPoints,
    cellSize: sc.cellSize, chunkSize: sc.chunkSize, projection: sc.projection,
  };
  const indexes = KINDS.map((k) => createShaftIndex(k, opts));
  const shafts: V3[][] = sc.starts.map(() => []);
  // Round-robin growth, each axon's start point first.
  const events: [number, V3][] = [];
  const pos = sc.starts.map((s) => [...s] as V3);
  sc.starts.forEach((s, a) => events.push([a, [...s] as V3]));
  const maxSteps = Math.max(...sc.steps.map((s) => s.length));
  for (let t = 0; t < maxSteps; t++) {
    for (let a = 0; a < sc.steps.length; a++) {
      const st = sc.steps[a][t];
      if (!st) continue;
      pos[a] = [pos[a][0] + st[0], pos[a][1] + st[1], pos[a][2] + st[2]];
      events.push([a, pos[a]]);
    }
  }
  const stages = [Math.floor(events.length / 3), Math.floor((2 * events.length) / 3), events.length];
  let done = 0;
  for (const stage of stages) {
    for (; done < stage; done++) {
      const [a, p] = events[done];
      // The store keeps float32 points (engine/index/shaftIndex.ts); the oracle measures the
      // same rounded points the indexes hold.
      shafts[a].push([Math.fround(p[0]), Math.fround(p[1]), Math.fround(p[2])]);
      for (const ix of indexes) ix.append(a, ...p);
    }
    const segs = shafts.reduce((n, s) => n + Math.max(0, s.length - 1), 0);
    for (const ix of indexes) expect(ix.segmentCount).toBe(segs);
    for (const q of sc.queries) checkQuery(q, shafts, indexes);
  }
}

/** Plain assertion for hot loops (expect() is too slow to call per segment). */
function check(ok: boolean, msg: string): void {
  if (!ok) throw new Error(msg);
}

function checkQuery(q: Scene['queries'][number], shafts: V3[][], indexes: ShaftIndex[]): void {
  const grown = shafts.map((s, a) => [s, a] as const).filter(([s]) => s.length > 0);
  if (grown.length === 0) return;
  const [shaft] = grown[q.axon % grown.length];
  const base = shaft[q.point % shaft.length];
  const p: V3 = [base[0] + q.off[0], base[1] + q.off[1], base[2] + q.off[2]];
  const accept = (a: number) => ((q.acceptMask >>> (a % 31)) & 1) === 1;

  // Oracle: every segment's three.js distance.
  let refMin = Infinity;
  const refWithin = new Map<string, number>();
  shafts.forEach((sh, a) => {
    for (let s = 0; s + 1 < sh.length; s++) {
      const { d } = refDistance(sh, s, p);
      if (accept(a) && d < refMin) refMin = d;
      if (d <= q.r + 1e-9) refWithin.set(`${a}:${s}`, d);
    }
  });
  const nearBoundary = Math.abs(refMin - q.r) <= 1e-9;

  const answers = indexes.map((ix) => {
    const out = createNearestSegment();
    const found = ix.nearestSegment(...p, q.r, accept, out);
    expect(found).toBe(out.found);
    if (!nearBoundary) expect(found).toBe(refMin <= q.r);
    if (found) {
      expect(Math.abs(out.distance - refMin)).toBeLessThanOrEqual(1e-9);
      expect(out.distance).toBeLessThanOrEqual(q.r);
      expect(accept(out.axon)).toBe(true);
      // The reported segment really is at that distance, through the reported point.
      const sh = shafts[out.axon];
      const { d, q: c } = refDistance(sh, out.segment, p);
      expect(Math.abs(d - out.distance)).toBeLessThanOrEqual(1e-9);
      expect(Math.hypot(out.px - c[0], out.py - c[1], out.pz - c[2])).toBeLessThanOrEqual(1e-9);
      const A = sh[out.segment], B = sh[out.segment + 1];
      const len = Math.hypot(B[0] - A[0], B[1] - A[1], B[2] - A[2]);
      const t: V3 = len > 0 ? [(B[0] - A[0]) / len, (B[1] - A[1]) / len, (B[2] - A[2]) / len] : [0, 0, 0];
      expect(Math.hypot(out.tx - t[0], out.ty - t[1], out.tz - t[2])).toBeLessThanOrEqual(1e-9);
    }
    const within = new Map<string, number>();
    ix.segmentsWithin(...p, q.r, (a, s, d) => {
      const key = `${a}:${s}`;
      check(!within.has(key), `segment ${key} visited twice`);
      within.set(key, d);
    });
    // Sandwich against the oracle: everything clearly inside is reported, nothing outside.
    for (const [key, d] of refWithin) check(d >= q.r - 1e-9 || within.has(key), `missed ${key} at ${d} < r = ${q.r}`);
    for (const [key, d] of within) {
      const ref = refWithin.get(key);
      check(ref !== undefined && Math.abs(d - ref) <= 1e-9, `reported ${key} at ${d}, oracle says ${ref}`);
    }
    return { found, distance: out.distance, within };
  });

  // Fast indexes vs brute force: identical answers.
  const [brute, ...fast] = answers;
  for (const f of fast) {
    expect(f.found).toBe(brute.found);
    if (brute.found) expect(Math.abs(f.distance - brute.distance)).toBeLessThanOrEqual(1e-9);
    check(f.within.size === brute.within.size, `${f.within.size} segments within r, brute force has ${brute.within.size}`);
    for (const [key, d] of f.within) {
      const b = brute.within.get(key);
      check(b !== undefined && Math.abs(d - b) <= 1e-9, `within: ${key} at ${d}, brute force says ${b}`);
    }
  }
}

describe('shaft indexes vs exhaustive search', () => {
  it('random walks, random queries: rtree and hashgrid match brute force and the three.js oracle', () => {
    fc.assert(fc.property(scene, runScene), { numRuns: 300 });
  });

  it('a dense bundle: many axons crowded into a small volume', () => {
    // Larger than the random scenes: 60 axons × 80 steps in a 40 µm box, radius 5–15 µm.
    const big = fc.record({
      seedStarts: fc.array(vec(20), { minLength: 60, maxLength: 60 }),
      steps: fc.array(fc.array(vec(2), { minLength: 80, maxLength: 80 }), { minLength: 60, maxLength: 60 }),
      queries: fc.array(
        fc.record({ axon: fc.nat(), point: fc.nat(), off: vec(10), r: fc.double({ min: 5, max: 15, noNaN: true }), acceptMask: fc.nat() }),
        { minLength: 20, maxLength: 20 },
      ),
    });
    fc.assert(
      fc.property(big, (b) =>
        runScene({
          starts: b.seedStarts, steps: b.steps, optAxons: 60, optMaxPoints: 81,
          cellSize: 10, chunkSize: 8, projection: 'xy', queries: b.queries,
        }),
      ),
      { numRuns: 5, endOnFailure: true }, // shrinking 4,800-segment scenes would take minutes
    );
  });
});

describe('shaft index edge cases', () => {
  it('outgrowing every preallocation (cells, points per axon, axon count) keeps answers exact', () => {
    // 40 axons announced as 4 with 8 points each, grown to 400 points in 1 µm cells: the hash
    // grid's cell table, block pool and key stride all double several times on the way.
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 30 }), (seed) => {
        let st = seed;
        const rand = () => ((st = (Math.imul(st, 1103515245) + 12345) >>> 0) / 2 ** 32);
        const opts = { axons: 4, maxPointsPerAxon: 8, cellSize: 1, chunkSize: 8 };
        const [brute, ...fast] = KINDS.map((k) => createShaftIndex(k, opts));
        const pos = Array.from({ length: 40 }, () => [rand() * 60, rand() * 60, rand() * 60]);
        for (let t = 0; t < 400; t++) {
          for (let a = 0; a < 40; a++) {
            for (let c = 0; c < 3; c++) pos[a][c] += 3 * (rand() - 0.5);
            brute.append(a, pos[a][0], pos[a][1], pos[a][2]);
            for (const f of fast) f.append(a, pos[a][0], pos[a][1], pos[a][2]);
          }
        }
        const ref = createNearestSegment(), out = createNearestSegment();
        for (let j = 0; j < 200; j++) {
          const x = rand() * 60, y = rand() * 60, z = rand() * 60, r = 1 + 4 * rand(), me = j % 40;
          const found = brute.nearestSegment(x, y, z, r, (a) => a !== me, ref);
          let n = 0;
          brute.segmentsWithin(x, y, z, r, () => n++);
          for (const f of fast) {
            check(f.nearestSegment(x, y, z, r, (a) => a !== me, out) === found, 'found differs');
            check(!found || Math.abs(out.distance - ref.distance) <= 1e-9, `nearest ${out.distance} vs ${ref.distance}`);
            let m = 0;
            f.segmentsWithin(x, y, z, r, () => m++);
            check(m === n, `within: ${m} segments vs ${n}`);
          }
        }
      }),
      { numRuns: 3 },
    );
  });

  it('an empty index finds nothing', () => {
    for (const k of KINDS) {
      const ix = createShaftIndex(k, { axons: 4, maxPointsPerAxon: 4 });
      const out = createNearestSegment();
      expect(ix.nearestSegment(0, 0, 0, 100, () => true, out)).toBe(false);
      ix.append(2, 1, 1, 1); // a single point is no segment yet
      expect(ix.nearestSegment(1, 1, 1, 100, () => true, out)).toBe(false);
      expect(ix.segmentCount).toBe(0);
    }
  });

  it('the accept filter skips an axon even when it is nearest', () => {
    for (const k of KINDS) {
      const ix = createShaftIndex(k, { axons: 2, maxPointsPerAxon: 4, cellSize: 5 });
      ix.append(0, 0, 0, 0); ix.append(0, 10, 0, 0); // 1 µm from the query
      ix.append(1, 0, 4, 0); ix.append(1, 10, 4, 0); // 3 µm from the query (hand geometry)
      const out = createNearestSegment();
      expect(ix.nearestSegment(5, 1, 0, 10, () => true, out)).toBe(true);
      expect([out.axon, out.distance]).toEqual([0, 1]);
      expect(ix.nearestSegment(5, 1, 0, 10, (a) => a !== 0, out)).toBe(true);
      expect([out.axon, out.segment, out.distance, out.px, out.py, out.pz]).toEqual([1, 0, 3, 5, 4, 0]);
      expect([out.tx, out.ty, out.tz]).toEqual([1, 0, 0]);
      expect(ix.nearestSegment(5, 1, 0, 2.9, (a) => a !== 0, out)).toBe(false);
    }
  });

  it('rejects non-finite points and bad axon ids', () => {
    for (const k of KINDS) {
      const ix = createShaftIndex(k, { axons: 1, maxPointsPerAxon: 2 });
      expect(() => ix.append(0, NaN, 0, 0)).toThrow(RangeError);
      expect(() => ix.append(-1, 0, 0, 0)).toThrow(RangeError);
      expect(() => ix.append(0.5, 0, 0, 0)).toThrow(RangeError);
    }
    expect(() => createShaftIndex('octree' as ShaftIndexKind, { axons: 1, maxPointsPerAxon: 2 })).toThrow(RangeError);
  });
});
