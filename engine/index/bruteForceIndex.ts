// Exhaustive shaft index: every query scans every segment. O(total segments) per query; it
// exists as the reference the fast indexes are tested and benchmarked against.

import {
  type NearestSegment,
  type ShaftIndex,
  type ShaftIndexOptions,
  ShaftStore,
  clearNearest,
  fillNearest,
  pointSegmentDistanceSq,
} from './shaftIndex.ts';

export class BruteForceShaftIndex implements ShaftIndex {
  private readonly store: ShaftStore;

  constructor(opts: ShaftIndexOptions) {
    this.store = new ShaftStore(opts.axons, opts.maxPointsPerAxon);
  }

  get shafts(): ShaftStore {
    return this.store;
  }

  get segmentCount(): number {
    return this.store.segmentCount;
  }

  append(axon: number, x: number, y: number, z: number): void {
    this.store.append(axon, x, y, z);
  }

  nearestSegment(
    x: number, y: number, z: number, r: number,
    accept: (axon: number) => boolean, out: NearestSegment,
  ): boolean {
    return scanNearest(this.store, x, y, z, r, accept, out);
  }

  segmentsWithin(
    x: number, y: number, z: number, r: number,
    visit: (axon: number, segment: number, distance: number) => void,
  ): void {
    scanWithin(this.store, x, y, z, r, visit);
  }
}

/** Nearest accepted segment within r by scanning every shaft in `store` (also the hash grid's
 *  fallback when a query box would span too many cells). Writes out; returns out.found. */
export function scanNearest(
  store: ShaftStore, x: number, y: number, z: number, r: number,
  accept: (axon: number) => boolean, out: NearestSegment,
): boolean {
  clearNearest(out);
  const p = store.xyz, ps = store.pointStep, r2 = r * r;
  let best2 = Infinity, bestA = -1, bestS = -1;
  for (let a = 0; a < store.axonCount; a++) {
    const n = store.pointCount[a];
    if (n < 2 || !accept(a)) continue;
    for (let s = 0, o = store.offset(a, 0); s < n - 1; s++, o += ps) {
      const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
      if (d2 <= r2 && d2 < best2) {
        best2 = d2;
        bestA = a;
        bestS = s;
      }
    }
  }
  if (bestA >= 0) fillNearest(out, store, bestA, bestS, x, y, z, best2);
  return out.found;
}

/** Every segment within r of (x, y, z), by scanning every shaft in `store`. */
export function scanWithin(
  store: ShaftStore, x: number, y: number, z: number, r: number,
  visit: (axon: number, segment: number, distance: number) => void,
): void {
  const p = store.xyz, ps = store.pointStep, r2 = r * r;
  for (let a = 0; a < store.axonCount; a++) {
    const n = store.pointCount[a];
    for (let s = 0, o = store.offset(a, 0); s < n - 1; s++, o += ps) {
      const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
      if (d2 <= r2) visit(a, s, Math.sqrt(d2));
    }
  }
}
