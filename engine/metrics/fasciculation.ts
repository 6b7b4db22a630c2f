// How much the axons of a run bundled, for run.json's metrics.fasciculation.
//
// Definitions (shaft lengths in µm; a shaft is the polyline an axon laid, segment by segment).
// Walk axon a's shaft segment by segment; for segment s (length ℓ(s)) take its midpoint m (a
// growth step is a few µm against r_f of 5–20 µm, so the midpoint stands for the segment).
//
//   fasciculated(s) ⇔ some segment of another axon, of a class a adheres to, lies within a's
//     capture radius r_f of m.
//   fasciculatedFraction = Σ ℓ(s) over fasciculated s / Σ ℓ(s) over all s
//     i.e. the share of shaft length within r_f of a compatible other axon.
//
//   the axon a runs along, b(s): at the first fasciculated segment, the owner of the nearest such
//     segment; then the same axon for as long as it stays within r_f (followed along its shaft,
//     segments around the last nearest one); when it is lost, the nearest again.
//   share(a → b) = Σ ℓ(s) over s with b(s) = b / a's shaft length
//   link(a, b) ⇔ share(a → b) ≥ linkShare (default 0.1), for either order of the pair
//   bundle: a connected component of the link graph with at least two axons
//   bundleCount: the number of bundles; meanBundleSize: axons per bundle averaged over bundles
//   (0 when there is none); largestBundle; bundledAxonFraction: share of axons with a shaft
//   that are in a bundle.
//
// Why "the axon a runs along" and not every axon within r_f: counting every neighbour of every
// segment costs the sum of all neighbourhood sizes, which grows with the square of the local
// density (measured: ~20 s at the end of a 10,000-axon, 60-step run converging into one bundle,
// against ~2 s this way), while following one partner costs a few distance tests per segment
// and one index search each time the partner is lost. Chains of such partners join a crowded
// bundle into one component; a shaft crossed in passing (a few r_f of a long path) links nothing.
// fasciculatedFraction stays exact: a segment near its followed partner is fasciculated, and
// one that is not is decided by an index search within r_f.
//
// Cost: per segment a few distance tests along the partner's shaft, and a nearest query on the
// run's own shaft index where there is no partner. Done once, after the last step.
//
// nearestOnShaft and nearestFromHint below are the two query helpers this pass and the
// fasciculation rule's steering share.

import {
  type NearestSegment, type ShaftIndex, type ShaftStore,
  clearNearest, createNearestSegment, fillNearest, pointSegmentDistanceSq,
} from '../index/shaftIndex.ts';

export interface FasciculationInput {
  /** every shaft's points, under ids 0 .. n−1 */
  shafts: ShaftStore;
  /** the same shafts, indexed under the same ids */
  index: ShaftIndex;
  /** r_f of each shaft id, µm */
  radius: ArrayLike<number>;
  /** does shaft a's axon adhere to shaft b's class? (only asked for a ≠ b) */
  adheres(a: number, b: number): boolean;
  /** share of a shaft's length that links two axons (default 0.1) */
  linkShare?: number;
  /** summaries for id ranges [from, to), e.g. per population */
  groups?: { name: string; from: number; to: number }[];
}

export interface FasciculationSummary {
  fasciculatedFraction: number;
  /** shaft length, µm, and the part of it within r_f of a compatible other axon */
  shaftLengthUm: number;
  fasciculatedLengthUm: number;
}

export interface FasciculationMetrics extends FasciculationSummary {
  bundleCount: number;
  meanBundleSize: number;
  largestBundle: number;
  bundledAxonFraction: number;
  linkShare: number;
  populations?: Record<string, FasciculationSummary>;
}

/** Segments either side of the last nearest one that a followed shaft is searched over. */
export const HINT_WINDOW = 2;

export function fasciculationMetrics(input: FasciculationInput): FasciculationMetrics {
  const { shafts, index, radius, adheres } = input;
  const linkShare = input.linkShare ?? 0.1;
  const n = shafts.axonCount;
  const p = shafts.xyz, ps = shafts.pointStep;

  const length = new Float64Array(n);
  const fasc = new Float64Array(n);
  // Per-axon scratch: acc[b] = length of a that runs along b, with the touched b listed so the
  // reset costs only what was touched.
  const acc = new Float64Array(n);
  const touched = new Int32Array(n);
  let touchedCount = 0;
  let a = -1;
  const accept = (b: number): boolean => b !== a && adheres(a, b);
  const near = createNearestSegment();

  const links = new UnionFind(n);
  for (a = 0; a < n; a++) {
    const r = radius[a];
    let hintAxon = -1, hintSegment = 0;
    for (let s = 0, o = shafts.offset(a, 0); s < shafts.pointCount[a] - 1; s++, o += ps) {
      const dx = p[o + ps] - p[o], dy = p[o + ps + 1] - p[o + 1], dz = p[o + ps + 2] - p[o + 2];
      const len = Math.sqrt(dx * dx + dy * dy + dz * dz);
      if (len === 0) continue;
      length[a] += len;
      const mx = p[o] + 0.5 * dx, my = p[o + 1] + 0.5 * dy, mz = p[o + 2] + 0.5 * dz;
      const found = (hintAxon >= 0 && nearestOnShaft(shafts, mx, my, mz, r, hintAxon, hintSegment, HINT_WINDOW, near))
        || index.nearestSegment(mx, my, mz, r, accept, near);
      if (!found) {
        hintAxon = -1;
        continue;
      }
      const b = near.axon;
      hintAxon = b;
      hintSegment = near.segment;
      fasc[a] += len;
      if (acc[b] === 0) touched[touchedCount++] = b;
      acc[b] += len;
    }
    for (let t = 0; t < touchedCount; t++) {
      const b = touched[t];
      if (acc[b] >= linkShare * length[a]) links.union(a, b);
      acc[b] = 0;
    }
    touchedCount = 0;
  }

  // Components of two or more axons (with a shaft) are bundles.
  const size = new Int32Array(n);
  let withShaft = 0;
  for (let i = 0; i < n; i++) {
    if (length[i] === 0) continue;
    withShaft++;
    size[links.find(i)]++;
  }
  let bundles = 0, bundled = 0, largest = 0;
  for (let i = 0; i < n; i++) {
    if (size[i] < 2) continue;
    bundles++;
    bundled += size[i];
    if (size[i] > largest) largest = size[i];
  }

  const out: FasciculationMetrics = {
    ...summarise(length, fasc, 0, n),
    bundleCount: bundles,
    meanBundleSize: bundles ? bundled / bundles : 0,
    largestBundle: largest,
    bundledAxonFraction: withShaft ? bundled / withShaft : 0,
    linkShare,
  };
  if (input.groups) {
    out.populations = {};
    for (const g of input.groups) out.populations[g.name] = summarise(length, fasc, g.from, g.to);
  }
  return out;
}

/** Nearest accepted segment within r of (x, y, z): the same answer as index.nearestSegment
 *  (up to ties), found faster from a hint. The segments hintSegment ± window of shaft hintAxon
 *  (an earlier answer nearby, for which accept must hold; −1 for none) bound the answer's
 *  distance by their own d ≤ r, and the index is asked within d instead of r: the nearest within
 *  r lies within d. A cone or midpoint 3 µm from its bundle then searches a box of ~6 µm
 *  instead of 2·r_f, with a fraction of the candidates. Writes out; returns out.found. */
export function nearestFromHint(
  index: ShaftIndex, shafts: ShaftStore,
  x: number, y: number, z: number, r: number,
  accept: (axon: number) => boolean,
  hintAxon: number, hintSegment: number, window: number,
  out: NearestSegment,
): boolean {
  let rq = r;
  if (hintAxon >= 0 && nearestOnShaft(shafts, x, y, z, r, hintAxon, hintSegment, window, out)) {
    // slack so the index, measuring the same segment the same way, cannot round it out
    rq = Math.min(r, out.distance * (1 + 1e-9) + 1e-9);
    const ha = out.axon, hs = out.segment, hd = out.distance;
    if (index.nearestSegment(x, y, z, rq, accept, out)) return true;
    fillNearest(out, shafts, ha, hs, x, y, z, hd * hd);
    return true;
  }
  return index.nearestSegment(x, y, z, rq, accept, out);
}

/** Nearest segment within r of (x, y, z) among segments segment ± window of one shaft (clipped
 *  to the shaft). Writes out; returns out.found. */
export function nearestOnShaft(
  shafts: ShaftStore,
  x: number, y: number, z: number, r: number,
  axon: number, segment: number, window: number,
  out: NearestSegment,
): boolean {
  const p = shafts.xyz, ps = shafts.pointStep;
  const s0 = Math.max(0, segment - window);
  const s1 = Math.min(shafts.pointCount[axon] - 2, segment + window);
  let bestS = -1, best2 = r * r;
  for (let s = s0, o = shafts.offset(axon, s0); s <= s1; s++, o += ps) {
    const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
    if (d2 <= best2) {
      best2 = d2;
      bestS = s;
    }
  }
  if (bestS < 0) {
    clearNearest(out);
    return false;
  }
  fillNearest(out, shafts, axon, bestS, x, y, z, best2);
  return true;
}

// ---------------------------------------------------------------------------------------------

function summarise(length: Float64Array, fasc: Float64Array, from: number, to: number): FasciculationSummary {
  let total = 0, near = 0;
  for (let i = from; i < to; i++) {
    total += length[i];
    near += fasc[i];
  }
  return { fasciculatedFraction: total > 0 ? near / total : 0, shaftLengthUm: total, fasciculatedLengthUm: near };
}

/** Disjoint sets with path halving and union by size (Tarjan, J. ACM 22, 1975, from memory). */
class UnionFind {
  private readonly parent: Int32Array;
  private readonly size: Int32Array;

  constructor(n: number) {
    this.parent = new Int32Array(n);
    this.size = new Int32Array(n).fill(1);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }

  find(i: number): number {
    const parent = this.parent;
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]];
      i = parent[i];
    }
    return i;
  }

  union(a: number, b: number): void {
    let ra = this.find(a), rb = this.find(b);
    if (ra === rb) return;
    if (this.size[ra] < this.size[rb]) [ra, rb] = [rb, ra];
    this.parent[rb] = ra;
    this.size[ra] += this.size[rb];
  }
}
