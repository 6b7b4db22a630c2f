// Shaft index on a uniform 3D hash grid, all in typed arrays.
//
// Space is cut into cubes of edge `cellSize`; a cube (i, j, k) hashes to a bucket of a
// power-of-two table. Each bucket heads a singly linked list of entries (head / next
// Int32Arrays); an entry holds one segment key a·stride + s. A segment is entered in every
// cell its bounding box touches, so a query visits only the cells its own box touches and a
// segment reached through several cells is skipped after the first by a per-query stamp.
// Different cells may share a bucket; that costs a distance test, never a wrong answer, since
// every candidate is measured exactly. Appending a segment is O(cells it touches); entry arrays
// double when full, and the table quadruples (a rebuild from the stored points) when it holds
// more than two entries per bucket, so appends are amortised O(1). The grid needs no bounds.

import {
  BOX_SLACK,
  type NearestSegment,
  type ShaftIndex,
  type ShaftIndexOptions,
  ShaftStore,
  clearNearest,
  fillNearest,
  pointSegmentDistanceSq,
} from './shaftIndex.ts';

const DEFAULT_CELL_SIZE = 20; // µm, upper end of the fasciculation radius

export class HashGridShaftIndex implements ShaftIndex {
  readonly cellSize: number;
  private readonly inv: number;
  private readonly store: ShaftStore;
  private head: Int32Array;
  private mask: number;
  private entryKey: Int32Array;
  private entryNext: Int32Array;
  private entryCount = 0;
  /** stride the entry keys were written with; the store may double it */
  private keyStride: number;
  private stamp: Int32Array;
  private stampValue = 0;

  constructor(opts: ShaftIndexOptions) {
    const cellSize = opts.cellSize ?? DEFAULT_CELL_SIZE;
    if (!(cellSize > 0) || !Number.isFinite(cellSize)) throw new RangeError(`cellSize must be > 0, got ${cellSize}`);
    this.cellSize = cellSize;
    this.inv = 1 / cellSize;
    this.store = new ShaftStore(opts.axons, opts.maxPointsPerAxon);
    this.keyStride = this.store.stride;
    // Short segments (a growth step is a few µm, a cell ~ the query radius) mostly touch one
    // cell, so the expected segment count sizes both the table and the entry arrays.
    const expected = Math.max(1024, Math.ceil(opts.axons) * Math.ceil(opts.maxPointsPerAxon));
    const tableSize = nextPow2(expected >>> 1);
    this.head = new Int32Array(tableSize).fill(-1);
    this.mask = tableSize - 1;
    this.entryKey = new Int32Array(expected + (expected >>> 2));
    this.entryNext = new Int32Array(this.entryKey.length);
    this.stamp = new Int32Array(this.store.axonCapacity * this.store.stride);
  }

  get segmentCount(): number {
    return this.store.segmentCount;
  }

  append(axon: number, x: number, y: number, z: number): void {
    const store = this.store;
    const n = store.append(axon, x, y, z);
    if (store.stride !== this.keyStride) {
      this.keyStride = store.stride;
      this.rebuild(this.head.length); // also enters the new segment
    } else if (n >= 2) {
      this.insertSegment(axon, n - 2);
    }
    if (this.stamp.length < store.axonCapacity * store.stride) {
      this.stamp = new Int32Array(store.axonCapacity * store.stride);
      this.stampValue = 0;
    }
    if (this.entryCount > 2 * this.head.length) this.rebuild(this.head.length * 4);
  }

  nearestSegment(
    x: number, y: number, z: number, r: number,
    accept: (axon: number) => boolean, out: NearestSegment,
  ): boolean {
    clearNearest(out);
    const store = this.store;
    const r2 = r * r;
    let best2 = Infinity, bestA = -1, bestS = -1;
    const inv = this.inv, e = r + BOX_SLACK;
    const ix0 = Math.floor((x - e) * inv), ix1 = Math.floor((x + e) * inv);
    const iy0 = Math.floor((y - e) * inv), iy1 = Math.floor((y + e) * inv);
    const iz0 = Math.floor((z - e) * inv), iz1 = Math.floor((z + e) * inv);
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return this.nearestByScan(x, y, z, r, accept, out);
    const stamp = this.stamp, st = this.nextStamp();
    const head = this.head, mask = this.mask, keys = this.entryKey, next = this.entryNext;
    const p = store.xyz, stride = store.stride;
    for (let k = iz0; k <= iz1; k++) {
      for (let j = iy0; j <= iy1; j++) {
        for (let i = ix0; i <= ix1; i++) {
          for (let en = head[cellHash(i, j, k) & mask]; en !== -1; en = next[en]) {
            const key = keys[en];
            if (stamp[key] === st) continue;
            stamp[key] = st;
            const a = (key / stride) | 0;
            if (!accept(a)) continue;
            const o = key * 3;
            const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + 3], p[o + 4], p[o + 5]);
            if (d2 <= r2 && d2 < best2) {
              best2 = d2;
              bestA = a;
              bestS = key - a * stride;
            }
          }
        }
      }
    }
    if (bestA >= 0) fillNearest(out, store, bestA, bestS, x, y, z, best2);
    return out.found;
  }

  segmentsWithin(
    x: number, y: number, z: number, r: number,
    visit: (axon: number, segment: number, distance: number) => void,
  ): void {
    const store = this.store;
    const r2 = r * r;
    const inv = this.inv, e = r + BOX_SLACK;
    const ix0 = Math.floor((x - e) * inv), ix1 = Math.floor((x + e) * inv);
    const iy0 = Math.floor((y - e) * inv), iy1 = Math.floor((y + e) * inv);
    const iz0 = Math.floor((z - e) * inv), iz1 = Math.floor((z + e) * inv);
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return this.withinByScan(x, y, z, r, visit);
    const stamp = this.stamp, st = this.nextStamp();
    const head = this.head, mask = this.mask, keys = this.entryKey, next = this.entryNext;
    const p = store.xyz, stride = store.stride;
    for (let k = iz0; k <= iz1; k++) {
      for (let j = iy0; j <= iy1; j++) {
        for (let i = ix0; i <= ix1; i++) {
          for (let en = head[cellHash(i, j, k) & mask]; en !== -1; en = next[en]) {
            const key = keys[en];
            if (stamp[key] === st) continue;
            stamp[key] = st;
            const o = key * 3;
            const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + 3], p[o + 4], p[o + 5]);
            if (d2 <= r2) {
              const a = (key / stride) | 0;
              visit(a, key - a * stride, Math.sqrt(d2));
            }
          }
        }
      }
    }
  }

  // -------------------------------------------------------------------------------------------

  private insertSegment(a: number, s: number): void {
    const p = this.store.xyz;
    const o = this.store.offset(a, s);
    const key = a * this.store.stride + s;
    const inv = this.inv;
    const ix0 = Math.floor(Math.min(p[o], p[o + 3]) * inv), ix1 = Math.floor(Math.max(p[o], p[o + 3]) * inv);
    const iy0 = Math.floor(Math.min(p[o + 1], p[o + 4]) * inv), iy1 = Math.floor(Math.max(p[o + 1], p[o + 4]) * inv);
    const iz0 = Math.floor(Math.min(p[o + 2], p[o + 5]) * inv), iz1 = Math.floor(Math.max(p[o + 2], p[o + 5]) * inv);
    for (let k = iz0; k <= iz1; k++) {
      for (let j = iy0; j <= iy1; j++) {
        for (let i = ix0; i <= ix1; i++) this.pushEntry(cellHash(i, j, k) & this.mask, key);
      }
    }
  }

  private pushEntry(bucket: number, key: number): void {
    if (this.entryCount === this.entryKey.length) {
      const keys = new Int32Array(this.entryKey.length * 2);
      keys.set(this.entryKey);
      const next = new Int32Array(keys.length);
      next.set(this.entryNext);
      this.entryKey = keys;
      this.entryNext = next;
    }
    const en = this.entryCount++;
    this.entryKey[en] = key;
    this.entryNext[en] = this.head[bucket];
    this.head[bucket] = en;
  }

  /** Re-enters every stored segment into a fresh table of `tableSize` buckets (after the table
   *  grows or the store re-lays its keys). O(total segments), and rare: both sizes double. */
  private rebuild(tableSize: number): void {
    if (tableSize !== this.head.length) this.head = new Int32Array(tableSize);
    this.head.fill(-1);
    this.mask = tableSize - 1;
    this.entryCount = 0;
    const store = this.store;
    for (let a = 0; a < store.axonCount; a++) {
      const n = store.pointCount[a];
      for (let s = 0; s < n - 1; s++) this.insertSegment(a, s);
    }
  }

  /** A query box spanning more cells than there are entries is cheaper as a plain scan. */
  private tooManyCells(ix0: number, ix1: number, iy0: number, iy1: number, iz0: number, iz1: number): boolean {
    return (ix1 - ix0 + 1) * (iy1 - iy0 + 1) * (iz1 - iz0 + 1) > this.entryCount + 64;
  }

  private nextStamp(): number {
    if (this.stampValue === 0x7fffffff) {
      this.stamp.fill(0);
      this.stampValue = 0;
    }
    return ++this.stampValue;
  }

  private nearestByScan(
    x: number, y: number, z: number, r: number,
    accept: (axon: number) => boolean, out: NearestSegment,
  ): boolean {
    const store = this.store, p = store.xyz, r2 = r * r;
    let best2 = Infinity, bestA = -1, bestS = -1;
    for (let a = 0; a < store.axonCount; a++) {
      const n = store.pointCount[a];
      if (n < 2 || !accept(a)) continue;
      for (let s = 0, o = store.offset(a, 0); s < n - 1; s++, o += 3) {
        const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + 3], p[o + 4], p[o + 5]);
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

  private withinByScan(
    x: number, y: number, z: number, r: number,
    visit: (axon: number, segment: number, distance: number) => void,
  ): void {
    const store = this.store, p = store.xyz, r2 = r * r;
    for (let a = 0; a < store.axonCount; a++) {
      const n = store.pointCount[a];
      for (let s = 0, o = store.offset(a, 0); s < n - 1; s++, o += 3) {
        const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + 3], p[o + 4], p[o + 5]);
        if (d2 <= r2) visit(a, s, Math.sqrt(d2));
      }
    }
  }
}

/** Cell (i, j, k) → 32-bit hash: the three-prime XOR hash for spatial hashing (Teschner et al.,
 *  "Optimized Spatial Hashing for Collision Detection of Deformable Objects", VMV 2003, from
 *  memory) followed by the murmur3 finaliser so the low bits a power-of-two mask keeps are
 *  well mixed. */
function cellHash(i: number, j: number, k: number): number {
  let h = Math.imul(i, 73856093) ^ Math.imul(j, 19349663) ^ Math.imul(k, 83492791);
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h;
}

function nextPow2(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}
