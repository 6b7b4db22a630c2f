// How good a topographic map is: the summary that run.json carries as metrics.map. Inputs are
// the mapped axons only (those that ended on a target sheet), all coordinates normalised to
// [0, 1] on their own sheets.
//
//   meanErrorUm, medianErrorUm, p95ErrorUm  per-axon error: the distance on the target sheet,
//        in µm, between where the axon terminated and where the expected map puts it; mean,
//        median and 95th percentile (quantile definition 7 of Hyndman & Fan 1996)
//   ectopicFraction  share of mapped axons whose error exceeds the ectopic threshold
//   spearmanU, spearmanV  Spearman's ρ between target u (v) and the source coordinate the
//        expected map feeds into it (source u for u, source v for v unless the scene says
//        otherwise), sign kept: a reversed axis is negative, a disordered one near 0
//   orderFlipFraction  of the neighbouring source pairs (closer than 1.5 mean spacings on the
//        source sheet), the share whose order along their dominant source axis is inverted
//        along the target axis that source axis feeds (reversal taken into account); 0 for a
//        perfectly ordered map, ½ for a random one
//   duplicationIndex  bimodality of target position among axons from the same source bin:
//        source axis split into `bins` equal bins, Sarle's bimodality coefficient of the paired
//        target coordinate in each bin (≥ 4 axons), averaged weighting by axon count, the
//        larger of the two axes; ≈ 1/3–5/9 for one termination zone per bin, towards 1 when
//        the axons of a bin split into two zones (a duplicated map)
import { spearman } from './rank.ts';
import { mean, quantileSorted, bimodalityCoefficient } from './stats.ts';
import type { AxisPairing } from './expected.ts';
import { buildPointGrid, pointsWithin } from '../index/pointGrid.ts';

/** The keys of metrics.map, in order; outside tools read exactly these. */
export const MAP_METRIC_KEYS = [
  'meanErrorUm', 'medianErrorUm', 'p95ErrorUm', 'ectopicFraction', 'spearmanU', 'spearmanV', 'orderFlipFraction', 'duplicationIndex',
] as const;
export type MapSummary = Record<(typeof MAP_METRIC_KEYS)[number], number>;

export interface MapSample {
  su: ArrayLike<number>;
  sv: ArrayLike<number>;
  tu: ArrayLike<number>;
  tv: ArrayLike<number>;
  errorUm: ArrayLike<number>;
  ectopic: ArrayLike<number>;
  /** which source sheet (population) each axon came from: neighbours are found within a group */
  group?: ArrayLike<number>;
}

export function mapSummary(s: MapSample, pairing: AxisPairing, bins = 10): MapSummary {
  const n = s.su.length;
  const errors = Float64Array.from(s.errorUm).sort();
  const src = (a: AxisPairing['u']) => (a.from === 'u' ? s.su : s.sv);
  return {
    meanErrorUm: mean(errors),
    medianErrorUm: quantileSorted(errors, 0.5),
    p95ErrorUm: quantileSorted(errors, 0.95),
    ectopicFraction: n ? mean(s.ectopic) : NaN,
    spearmanU: spearman(src(pairing.u), s.tu),
    spearmanV: spearman(src(pairing.v), s.tv),
    orderFlipFraction: orderFlipFraction(s, pairing),
    duplicationIndex: larger(duplicationAlong(src(pairing.u), s.tu, bins), duplicationAlong(src(pairing.v), s.tv, bins)),
  };
}

/** Share of neighbouring source pairs whose order is inverted on the target (see the header). */
export function orderFlipFraction(s: MapSample, pairing: AxisPairing): number {
  const n = s.su.length;
  if (n < 2) return NaN;
  // per source axis: which target coordinate it feeds and with which sign (0: feeds none)
  const feeds = { u: feed('u', pairing), v: feed('v', pairing) };
  let pairs = 0, flips = 0;
  const groups = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    const g = s.group ? s.group[i] : 0;
    let list = groups.get(g);
    if (!list) groups.set(g, (list = []));
    list.push(i);
  }
  for (const members of groups.values()) {
    const m = members.length;
    if (m < 2) continue;
    const xyz = new Float64Array(3 * m);
    members.forEach((i, k) => { xyz[3 * k] = s.su[i]; xyz[3 * k + 1] = s.sv[i]; });
    const r = 1.5 / Math.sqrt(m);
    const grid = buildPointGrid(xyz, m, r, { minX: 0, minY: 0, minZ: 0, maxX: 1, maxY: 1, maxZ: 0 });
    for (let a = 0; a < m; a++) {
      const i = members[a];
      pointsWithin(grid, s.su[i], s.sv[i], 0, r, (b) => {
        if (b <= a) return; // each pair once
        const j = members[b];
        const du = s.su[j] - s.su[i], dv = s.sv[j] - s.sv[i];
        const alongU = Math.abs(du) >= Math.abs(dv);
        const f = alongU ? feeds.u : feeds.v;
        if (f.sign === 0) return;
        const ds = alongU ? du : dv;
        if (ds === 0) return;
        const dt = f.target === 'u' ? s.tu[j] - s.tu[i] : s.tv[j] - s.tv[i];
        pairs++;
        if (ds * dt * f.sign < 0) flips++;
      });
    }
  }
  return pairs ? flips / pairs : NaN;
}

/** Count-weighted mean over source bins of the bimodality coefficient of target position. */
export function duplicationAlong(source: ArrayLike<number>, target: ArrayLike<number>, bins: number): number {
  const members: number[][] = Array.from({ length: bins }, () => []);
  for (let i = 0; i < source.length; i++) {
    const b = Math.min(bins - 1, Math.max(0, Math.floor(source[i] * bins)));
    members[b].push(target[i]);
  }
  let sum = 0, weight = 0;
  for (const values of members) {
    const bc = bimodalityCoefficient(values);
    if (!Number.isFinite(bc)) continue;
    sum += bc * values.length;
    weight += values.length;
  }
  return weight ? sum / weight : NaN;
}

function feed(axis: 'u' | 'v', p: AxisPairing): { target: 'u' | 'v'; sign: number } {
  if (p.u.from === axis) return { target: 'u', sign: p.u.reversed ? -1 : 1 };
  if (p.v.from === axis) return { target: 'v', sign: p.v.reversed ? -1 : 1 };
  return { target: 'u', sign: 0 };
}

/** the larger of two values, ignoring NaN (NaN only if both are) */
function larger(a: number, b: number): number {
  if (!Number.isFinite(a)) return b;
  if (!Number.isFinite(b)) return a;
  return Math.max(a, b);
}
