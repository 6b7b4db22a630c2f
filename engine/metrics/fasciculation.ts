// How much the axons of a run bundled, for run.json's metrics.fasciculation.
//
// Definitions (shaft lengths in µm; a shaft is the polyline an axon laid, segment by segment):
//
//   fasciculatedFraction = Σ ℓ(s) over fasciculated segments / Σ ℓ(s) over all segments
//     A segment s of axon a (length ℓ(s)) is fasciculated when some segment of another axon b,
//     of a class a adheres to, lies within a's capture radius r_f of the midpoint of s. The
//     midpoint stands for the segment: the share is exact for segments shorter than the detail
//     of the bundle, and a growth step is a few µm against r_f of 5–20 µm.
//
//   link(a, b): the length of a's shaft fasciculated onto b (segments whose midpoint is within
//     r_f of b's shaft) is at least `linkShare` (default ½) of a's whole shaft length, for a pair
//     where a adheres to b's class. Links are undirected for grouping: a follower riding a long
//     pioneer for most of its own length links to it even though the pioneer's share is small.
//
//   bundle: a connected component of the link graph with at least two axons.
//   bundleCount: the number of bundles; meanBundleSize: axons per bundle averaged over bundles
//   (0 when there is none); bundledAxonFraction: the share of axons (with a shaft) in a bundle.
//
// Cost: one within-radius query per segment on the run's own shaft index, done once after the
// last step, so no second index is built.

import type { ShaftIndex, ShaftStore } from '../index/shaftIndex.ts';

export interface FasciculationInput {
  /** every shaft's points, under ids 0 .. n−1 */
  shafts: ShaftStore;
  /** the same shafts, indexed, for the within-radius queries */
  index: ShaftIndex;
  /** r_f of each shaft id, µm */
  radius: ArrayLike<number>;
  /** does shaft a's axon adhere to shaft b's class? (only asked for a ≠ b) */
  adheres(a: number, b: number): boolean;
  /** share of a shaft's length that links two axons (default 0.5) */
  linkShare?: number;
  /** summaries for id ranges [from, to), e.g. per population */
  groups?: { name: string; from: number; to: number }[];
}

export interface FasciculationSummary {
  fasciculatedFraction: number;
  /** shaft length, µm, and the part of it that was fasciculated */
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

export function fasciculationMetrics(input: FasciculationInput): FasciculationMetrics {
  const { shafts, index, radius, adheres } = input;
  const linkShare = input.linkShare ?? 0.5;
  const n = shafts.axonCount;
  const p = shafts.xyz;

  const length = new Float64Array(n);
  const fasc = new Float64Array(n);
  // Per-axon scratch for "length of a near b": acc[b], with the touched b listed so the reset
  // costs only what was touched. seen[b] === stamp marks b found near the current segment.
  const acc = new Float64Array(n);
  const touched = new Int32Array(n);
  const seen = new Int32Array(n);
  let touchedCount = 0, stamp = 0, a = -1, segLen = 0, hit = false;
  const visit = (b: number): void => {
    if (b === a || seen[b] === stamp || !adheres(a, b)) return;
    seen[b] = stamp;
    hit = true;
    if (acc[b] === 0) touched[touchedCount++] = b;
    acc[b] += segLen;
  };

  const links = new UnionFind(n);
  for (a = 0; a < n; a++) {
    const points = shafts.pointCount[a];
    const r = radius[a];
    for (let s = 0, o = shafts.offset(a, 0); s < points - 1; s++, o += 3) {
      const dx = p[o + 3] - p[o], dy = p[o + 4] - p[o + 1], dz = p[o + 5] - p[o + 2];
      segLen = Math.sqrt(dx * dx + dy * dy + dz * dz);
      if (segLen === 0) continue;
      length[a] += segLen;
      stamp++;
      hit = false;
      index.segmentsWithin(p[o] + 0.5 * dx, p[o + 1] + 0.5 * dy, p[o + 2] + 0.5 * dz, r, visit);
      if (hit) fasc[a] += segLen;
    }
    for (let k = 0; k < touchedCount; k++) {
      const b = touched[k];
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
