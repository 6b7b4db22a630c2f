/**
 * Benchmark: nearest-segment queries on the shaft indexes (engine/index/), and the point grid.
 *
 *   npx tsx test/bench/index.bench.ts [--json] [--sizes 1000,10000,100000] [--repeats 5] [--full]
 *
 * Scene: N axons grow 500 steps of 2 µm each (v·Δt with v = 40 µm/h, Δt = 3 min; v from the
 * 20–60 µm/h range, from memory), all axons one step per round as the engine grows them, as
 * persistent random walks (heading += 0.3·uniform cube noise, renormalised) reflected inside a
 * cube whose side scales as 1000 µm · (N·steps / (1000·500))^(1/3): a constant 10⁻³ µm of
 * shaft per µm³ at every size (about 14 µm of other axons' shaft within 15 µm of a random
 * point). At 100,000 axons the shafts are 100 steps long unless --full is given (500 steps:
 * 50 M segments, about 2 GiB and over a minute of building), so the default run stays near a
 * minute and half a GiB; the output says which.
 * Queries: M nearest-segment queries, radius 15 µm, each at a random point of a random axon's
 * shaft plus a random offset within 10 µm, skipping that axon itself (accept = other axons).
 *
 * Measured per size: build time (the append calls only, summed over the growth, CPU time), and
 * the per-query time as the median over `repeats` passes through the same queries, in CPU time of
 * this single-threaded process (process.cpuUsage, so time lost to other processes on a shared
 * machine is not counted; wall-clock medians are reported beside it). Each index's pass covers
 * the first m of the M queries, m sized from a warm-up so a pass takes about 0.2 s (all M for a
 * fast index). Brute force, whose cost per query is the same for every query (it scans every
 * segment), runs on the first few queries only and says how many; the ratio compares per-query
 * medians. Brute force and the R-tree run at 1,000 and 10,000 axons only; at 100,000 only the
 * index that was fastest at 10,000. On the brute-force subset every index's answers are checked
 * against brute force (found flag and distance to 1e-9) and mismatches are reported.
 * JSON: indexSpeedup = brute-force per-query CPU median / best index per-query CPU median, at
 * 10,000 axons; indexBench holds every figure.
 */

import { type NearestSegment, type ShaftIndex, type ShaftIndexKind, createNearestSegment, createShaftIndex } from '../../engine/index/shaftIndex.ts';
import { buildPointGrid, pointsWithin, type PointGrid } from '../../engine/index/pointGrid.ts';

const args = process.argv.slice(2);
const opt = (name: string, fallback: string) => {
  const i = args.indexOf(name);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : fallback;
};
const json = args.includes('--json');
const sizes = opt('--sizes', '1000,10000,100000').split(',').map(Number);
const repeats = Math.max(1, Number(opt('--repeats', '5')));
// Human-readable lines go to stderr under --json so stdout's last line is the JSON object.
const log = (line: string) => (json ? process.stderr.write(line + '\n') : console.log(line));

const STEPS = 500;
const STEPS_100K = args.includes('--full') ? 500 : 100;
const STEP_UM = 2;
const RADIUS = 15;
const OFFSET_UM = 10;
const NOISE = 0.3;
const QUERIES = 20_000;
const PASS_S = 0.2; // target CPU seconds per timed pass
const MIN_QUERIES = 8;
const BRUTE_MAX_AXONS = 10_000;

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

/** mulberry32: small 32-bit PRNG, uniform in [0, 1) (common practice, no source). */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

interface Queries {
  xyz: Float64Array;
  self: Int32Array;
}

/** Grows N persistent walks step by step, appending each round to every index (timing each
 *  index's appends separately), and records the query points on the way. */
function growScene(n: number, steps: number, kinds: ShaftIndexKind[]): { indexes: Map<ShaftIndexKind, ShaftIndex>; buildMs: Map<ShaftIndexKind, number>; q: Queries; side: number } {
  const side = 1000 * Math.cbrt((n * steps) / (1000 * STEPS));
  const rand = rng(0x51a7 ^ n);
  const indexes = new Map<ShaftIndexKind, ShaftIndex>();
  const buildMs = new Map<ShaftIndexKind, number>();
  for (const k of kinds) {
    indexes.set(k, createShaftIndex(k, { axons: n, maxPointsPerAxon: steps + 1, cellSize: RADIUS }));
    buildMs.set(k, 0);
  }
  // Query plan: axon and shaft point of each query, bucketed by step so the point can be taken
  // when the walk passes it.
  const qAxon = new Int32Array(QUERIES), qStep = new Int32Array(QUERIES);
  const byStep = new Int32Array(steps + 2);
  for (let j = 0; j < QUERIES; j++) {
    qAxon[j] = Math.floor(rand() * n);
    qStep[j] = Math.floor(rand() * (steps + 1));
    byStep[qStep[j] + 1]++;
  }
  for (let t = 0; t <= steps; t++) byStep[t + 1] += byStep[t];
  const order = new Int32Array(QUERIES), fill = byStep.slice();
  for (let j = 0; j < QUERIES; j++) order[fill[qStep[j]]++] = j;
  const q: Queries = { xyz: new Float64Array(QUERIES * 3), self: qAxon };

  const pos = new Float64Array(n * 3), dir = new Float64Array(n * 3);
  for (let a = 0; a < n; a++) {
    for (let c = 0; c < 3; c++) pos[3 * a + c] = rand() * side;
    randomUnit(rand, dir, 3 * a);
  }
  for (let t = 0; t <= steps; t++) {
    if (t > 0) {
      for (let a = 0; a < n; a++) {
        const o = 3 * a;
        let hx = dir[o] + NOISE * (2 * rand() - 1), hy = dir[o + 1] + NOISE * (2 * rand() - 1), hz = dir[o + 2] + NOISE * (2 * rand() - 1);
        const len = Math.sqrt(hx * hx + hy * hy + hz * hz) || 1;
        hx /= len; hy /= len; hz /= len;
        dir[o] = hx; dir[o + 1] = hy; dir[o + 2] = hz;
        for (let c = 0; c < 3; c++) {
          let p = pos[o + c] + STEP_UM * dir[o + c];
          if (p < 0) { p = -p; dir[o + c] = -dir[o + c]; } else if (p > side) { p = 2 * side - p; dir[o + c] = -dir[o + c]; }
          pos[o + c] = p;
        }
      }
    }
    for (const [k, ix] of indexes) {
      const c0 = process.cpuUsage();
      for (let a = 0; a < n; a++) ix.append(a, pos[3 * a], pos[3 * a + 1], pos[3 * a + 2]);
      const c = process.cpuUsage(c0);
      buildMs.set(k, buildMs.get(k)! + (c.user + c.system) / 1000);
    }
    for (let i = byStep[t]; i < byStep[t + 1]; i++) {
      const j = order[i], o = 3 * qAxon[j];
      let ox: number, oy: number, oz: number;
      do {
        ox = 2 * rand() - 1; oy = 2 * rand() - 1; oz = 2 * rand() - 1;
      } while (ox * ox + oy * oy + oz * oz > 1);
      q.xyz[3 * j] = pos[o] + OFFSET_UM * ox;
      q.xyz[3 * j + 1] = pos[o + 1] + OFFSET_UM * oy;
      q.xyz[3 * j + 2] = pos[o + 2] + OFFSET_UM * oz;
    }
  }
  return { indexes, buildMs, q, side };
}

function randomUnit(rand: () => number, out: Float64Array, o: number): void {
  let x: number, y: number, z: number, l2: number;
  do {
    x = 2 * rand() - 1; y = 2 * rand() - 1; z = 2 * rand() - 1;
    l2 = x * x + y * y + z * z;
  } while (l2 > 1 || l2 < 1e-6);
  const l = Math.sqrt(l2);
  out[o] = x / l; out[o + 1] = y / l; out[o + 2] = z / l;
}

// One accept callback for every query (no closure per query): skip the querying axon itself.
let selfAxon = -1;
const notSelf = (a: number) => a !== selfAxon;
const out: NearestSegment = createNearestSegment();

/** Runs queries [0, m) once, writing each distance (or −1) into dist; returns [cpu ms, wall ms]. */
function runQueries(ix: ShaftIndex, q: Queries, m: number, dist: Float64Array): [number, number] {
  const c0 = process.cpuUsage(), t0 = performance.now();
  for (let j = 0; j < m; j++) {
    selfAxon = q.self[j];
    dist[j] = ix.nearestSegment(q.xyz[3 * j], q.xyz[3 * j + 1], q.xyz[3 * j + 2], RADIUS, notSelf, out) ? out.distance : -1;
  }
  const wall = performance.now() - t0, c = process.cpuUsage(c0);
  return [(c.user + c.system) / 1000, wall];
}

const result: {
  indexSpeedup?: number;
  indexBench: Record<string, unknown>;
} = { indexBench: { radiusUm: RADIUS, stepUm: STEP_UM, steps: STEPS, stepsAbove10k: STEPS_100K, queries: QUERIES, repeats, sizes: {} as Record<string, unknown> } };
const perSize = result.indexBench.sizes as Record<string, unknown>;

log(`index bench: nearest segment within ${RADIUS} µm, ${STEPS} steps × ${STEP_UM} µm per axon (${STEPS_100K} above 10,000 axons), median of ${repeats} passes, node ${process.version}`);
log('brute force is timed on its first `queries` queries only (its cost does not depend on the query point)');
log('axons    steps  box µm  segments   index   build s cpu  µs/query cpu (wall)   queries  hits   vs brute  mismatches');
let bestAt10k: ShaftIndexKind = 'hashgrid';
let peakRssMiB = 0;
for (const n of sizes) {
  const kinds: ShaftIndexKind[] = n <= BRUTE_MAX_AXONS ? ['brute', 'rtree', 'hashgrid'] : [bestAt10k];
  const steps = n > BRUTE_MAX_AXONS ? STEPS_100K : STEPS;
  const { indexes, buildMs, q, side } = growScene(n, steps, kinds);
  peakRssMiB = Math.max(peakRssMiB, process.memoryUsage().rss / 2 ** 20);
  const refDist = new Float64Array(QUERIES);
  const dist = new Float64Array(QUERIES);
  const row: Record<string, unknown> = { stepsPerAxon: steps, boxSideUm: Math.round(side), segments: indexes.values().next().value!.segmentCount };
  let bruteUs = NaN, mb = 0;
  const fastUs = new Map<ShaftIndexKind, number>();
  for (const k of kinds) {
    const ix = indexes.get(k)!;
    // Warm-up (JIT, caches) and pass sizing.
    const w = Math.min(QUERIES, k === 'brute' ? 4 : 500);
    const [warmMs] = runQueries(ix, q, w, dist);
    const m = Math.max(MIN_QUERIES, Math.min(QUERIES, Math.round((PASS_S * 1000 * w) / Math.max(warmMs, 1e-3))));
    const cpu: number[] = [], wall: number[] = [];
    for (let r = 0; r < repeats; r++) {
      const [c, t] = runQueries(ix, q, m, dist);
      cpu.push(c);
      wall.push(t);
    }
    const us = (median(cpu) / m) * 1000, wallUs = (median(wall) / m) * 1000;
    let hits = 0;
    for (let j = 0; j < m; j++) if (dist[j] >= 0) hits++;
    let mismatches = 0;
    if (k === 'brute') {
      bruteUs = us;
      mb = m;
      refDist.set(dist.subarray(0, m));
    } else {
      fastUs.set(k, us);
      for (let j = 0; j < Math.min(mb, m); j++) {
        if ((dist[j] < 0) !== (refDist[j] < 0) || Math.abs(dist[j] - refDist[j]) > 1e-9) mismatches++;
      }
    }
    const ratio = k !== 'brute' && mb > 0 ? bruteUs / us : NaN;
    row[k] = {
      buildS: +(buildMs.get(k)! / 1000).toFixed(3),
      usPerQueryCpu: +us.toPrecision(4),
      usPerQueryWall: +wallUs.toPrecision(4),
      queriesTimed: m,
      hitFraction: +(hits / m).toFixed(3),
      ...(k !== 'brute' && mb > 0 ? { speedupVsBrute: +ratio.toPrecision(4), checkedVsBrute: Math.min(mb, m), mismatchesVsBrute: mismatches } : {}),
    };
    log(
      `${String(n).padEnd(8)} ${String(steps).padStart(5)}  ${String(Math.round(side)).padStart(6)}  ${String(row.segments).padStart(9)}  ${k.padEnd(9)} ${(buildMs.get(k)! / 1000).toFixed(2).padStart(7)}  ` +
        `  ${us.toPrecision(4).padStart(9)} (${wallUs.toPrecision(4)})`.padEnd(24) +
        `${String(m).padStart(7)}  ${(hits / m).toFixed(3)}  ${Number.isNaN(ratio) ? '       -' : (ratio.toFixed(0) + '×').padStart(8)}  ${k === 'brute' || mb === 0 ? '-' : `${mismatches}/${Math.min(mb, m)}`}`,
    );
  }
  if (n === 10_000 && fastUs.size > 0) {
    const [bk, bus] = [...fastUs].sort((x, y) => x[1] - y[1])[0];
    bestAt10k = bk;
    result.indexSpeedup = +(bruteUs / bus).toPrecision(4);
    row.best = bk;
    row.bruteQueries = mb;
  }
  row.rssMiB = Math.round(process.memoryUsage().rss / 2 ** 20);
  perSize[String(n)] = row;
  indexes.clear();
}
log(`peak RSS ${Math.round(peakRssMiB)} MiB`);
if (result.indexSpeedup !== undefined) log(`indexSpeedup (brute force / ${bestAt10k}, per-query CPU time at 10,000 axons) = ${result.indexSpeedup}`);

// Point grid: rebuild over N moving points (terminals) each step, then one radius query per
// point, uniform points in the same volume scaling as above.
log('pointGrid: N points uniform in a cube of side 1000·(N/1000)^(1/3) µm, r = 15 µm, cell 15 µm');
log('points    build ms   µs/query   neighbours/query   (CPU time, median; builds after the first reuse the grid)');
const pg: Record<string, unknown> = {};
for (const n of [10_000, 100_000]) {
  const side = 1000 * Math.cbrt(n / 1000);
  const rand = rng(n);
  const xyz = new Float64Array(3 * n);
  for (let i = 0; i < 3 * n; i++) xyz[i] = rand() * side;
  const bounds = { minX: 0, minY: 0, minZ: 0, maxX: side, maxY: side, maxZ: side };
  let grid: PointGrid | undefined;
  const builds: number[] = [], queries: number[] = [];
  let found = 0;
  const visit = () => void found++;
  const cpuMs = (c0: NodeJS.CpuUsage) => {
    const c = process.cpuUsage(c0);
    return (c.user + c.system) / 1000;
  };
  for (let r = 0; r < repeats; r++) {
    let c0 = process.cpuUsage();
    grid = buildPointGrid(xyz, n, RADIUS, bounds, grid);
    builds.push(cpuMs(c0));
    found = 0;
    c0 = process.cpuUsage();
    for (let i = 0; i < n; i++) pointsWithin(grid, xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2], RADIUS, visit);
    queries.push(cpuMs(c0));
  }
  const b = median(builds), us = (median(queries) / n) * 1000;
  pg[String(n)] = { buildMs: +b.toPrecision(4), usPerQuery: +us.toPrecision(4), neighboursPerQuery: +(found / n).toFixed(3) };
  log(`${String(n).padEnd(9)} ${b.toFixed(2).padStart(8)}  ${us.toPrecision(4).padStart(9)}   ${(found / n).toFixed(3)} (self included)`);
}
result.indexBench.pointGrid = pg;
result.indexBench.peakRssMiB = Math.round(peakRssMiB);

if (json) process.stdout.write(JSON.stringify(result) + '\n');
