// Shaft index on an R-tree (rbush) over boxes of segment chunks.
//
// Each axon's segments are grouped into chunks of K consecutive segments; one rbush item per
// chunk carries the chunk's bounding box, so the tree holds N·(segments/K) boxes instead of one
// per segment, and a query that reaches a chunk scans its ≤ K segments from the shared store.
//
// Why 2D plus a per-chunk interval: rbush indexes rectangles only. We index the chunk's box
// projected on one plane (default x,y) and keep its extent along the third axis on the item;
// a chunk is scanned only if that interval also meets the query's. The plane test is a
// conservative cull (a segment within r in 3D is within r in every projection), so answers are
// exact; the price is that the tree walks every chunk in the query's column through the third
// axis. Choose the plane across the volume's thinnest axis (opts.projection) to keep that
// column short; for a cube-like volume the hash grid avoids the issue altogether.
//
// The open chunk (the one still filling, at most one per axon) lives in the tree like the
// others, with a "fat" box: its tight box padded on every side by the latest segment length
// times the number of segments the chunk still lacks. A shaft growing in steps no longer than
// that never leaves the fat box, so an append normally only bumps the chunk's count; a longer
// step triggers one remove + reinsert with a fresh fat box. When the chunk fills it is
// reinserted once with its tight box. That is ~2 tree updates per K appends, incremental,
// never a rebuild. (Keeping open chunks out of the tree would make every query scan N chunks.)
//
// Queries walk rbush's node tree (the same structure its toJSON() exports) with a reusable
// stack instead of calling search(), which allocates a result array per call, and shrink the
// search radius to the best distance found so far.

import RBush from 'rbush';
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

// 16 segments per box: measured (test/bench/index.bench.ts scene) to build about twice as fast
// as 8, with the same query cost, since the tree then holds half as many boxes.
const DEFAULT_CHUNK = 16;

/** One rbush item: a run of `count` segments of `axon` starting at segment `first`.
 *  minX..maxY are the projected plane (u, v); minW/maxW the third axis. */
interface Chunk {
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
  minW: number;
  maxW: number;
  axon: number;
  first: number;
  count: number;
}

/** rbush's internal node, as exported by toJSON(). */
interface TreeNode {
  children: (TreeNode | Chunk)[];
  leaf: boolean;
  height: number;
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

export class RTreeShaftIndex implements ShaftIndex {
  readonly chunkSize: number;
  private readonly store: ShaftStore;
  private readonly tree = new RBush<Chunk>();
  /** coordinate index (0 = x, 1 = y, 2 = z) of plane axes u, v and the filtered axis w */
  private readonly iu: number;
  private readonly iv: number;
  private readonly iw: number;
  /** each axon's open chunk, or null */
  private open: (Chunk | null)[] = [];
  /** tight box of each axon's open chunk: minU, minV, minW, maxU, maxV, maxW */
  private tight: Float64Array;
  /** DFS stack reused by every query (it only ever grows to tree height × fan-out) */
  private readonly stack: TreeNode[] = [];

  constructor(opts: ShaftIndexOptions) {
    const k = opts.chunkSize ?? DEFAULT_CHUNK;
    if (!Number.isInteger(k) || k < 1) throw new RangeError(`chunkSize must be a positive integer, got ${k}`);
    this.chunkSize = k;
    this.store = new ShaftStore(opts.axons, opts.maxPointsPerAxon);
    const proj = opts.projection ?? 'xy';
    [this.iu, this.iv, this.iw] = proj === 'xy' ? [0, 1, 2] : proj === 'xz' ? [0, 2, 1] : [1, 2, 0];
    this.tight = new Float64Array(this.store.axonCapacity * 6);
  }

  get shafts(): ShaftStore {
    return this.store;
  }

  get segmentCount(): number {
    return this.store.segmentCount;
  }

  append(axon: number, x: number, y: number, z: number): void {
    const store = this.store;
    const n = store.append(axon, x, y, z);
    if (this.tight.length < store.axonCapacity * 6) {
      const t = new Float64Array(store.axonCapacity * 6);
      t.set(this.tight);
      this.tight = t;
    }
    if (n < 2) return;
    const s = n - 2; // the new segment
    const p = store.xyz, o = store.offset(axon, s);
    const u0 = p[o + this.iu], v0 = p[o + this.iv], w0 = p[o + this.iw];
    const o1 = o + store.pointStep;
    const u1 = p[o1 + this.iu], v1 = p[o1 + this.iv], w1 = p[o1 + this.iw];
    const len = Math.sqrt((u1 - u0) ** 2 + (v1 - v0) ** 2 + (w1 - w0) ** 2);
    const K = this.chunkSize, t = this.tight, b = axon * 6;
    let c = this.open[axon] ?? null;

    if (c === null) {
      t[b] = Math.min(u0, u1); t[b + 1] = Math.min(v0, v1); t[b + 2] = Math.min(w0, w1);
      t[b + 3] = Math.max(u0, u1); t[b + 4] = Math.max(v0, v1); t[b + 5] = Math.max(w0, w1);
      c = { minX: 0, minY: 0, maxX: 0, maxY: 0, minW: 0, maxW: 0, axon, first: s, count: 1 };
      setBox(c, t, b, len * (K - 1));
      this.tree.insert(c);
      this.open[axon] = K === 1 ? null : c;
      return;
    }

    c.count++;
    if (u1 < t[b]) t[b] = u1;
    if (v1 < t[b + 1]) t[b + 1] = v1;
    if (w1 < t[b + 2]) t[b + 2] = w1;
    if (u1 > t[b + 3]) t[b + 3] = u1;
    if (v1 > t[b + 4]) t[b + 4] = v1;
    if (w1 > t[b + 5]) t[b + 5] = w1;
    if (c.count === K) {
      // Chunk full: shrink the fat box to the tight one, once.
      this.tree.remove(c);
      setBox(c, t, b, 0);
      this.tree.insert(c);
      this.open[axon] = null;
    } else if (u1 < c.minX || u1 > c.maxX || v1 < c.minY || v1 > c.maxY || w1 < c.minW || w1 > c.maxW) {
      // A step longer than the padding assumed: remove with the old box (rbush finds the item
      // by it), then reinsert with a fresh fat box.
      this.tree.remove(c);
      setBox(c, t, b, len * (K - c.count));
      this.tree.insert(c);
    }
  }

  nearestSegment(
    x: number, y: number, z: number, r: number,
    accept: (axon: number) => boolean, out: NearestSegment,
  ): boolean {
    clearNearest(out);
    const store = this.store, p = store.xyz, ps = store.pointStep;
    const qu = pick(this.iu, x, y, z), qv = pick(this.iv, x, y, z), qw = pick(this.iw, x, y, z);
    const r2 = r * r;
    let best2 = Infinity, bestA = -1, bestS = -1;
    // Cull radius: r, shrinking to the best distance so far, plus slack against rounding.
    let cull = r + BOX_SLACK;
    let cull2 = cull * cull;
    const stack = this.stack;
    let top = 0;
    const root = this.tree.toJSON() as TreeNode;
    if (root.children.length > 0) stack[top++] = root;
    while (top > 0) {
      const node = stack[--top];
      const children = node.children;
      if (!node.leaf) {
        for (let i = 0; i < children.length; i++) {
          const ch = children[i] as TreeNode;
          if (boxDist2(ch.minX, ch.minY, ch.maxX, ch.maxY, qu, qv) <= cull2) stack[top++] = ch;
        }
        continue;
      }
      for (let i = 0; i < children.length; i++) {
        const c = children[i] as Chunk;
        const dw = qw < c.minW ? c.minW - qw : qw > c.maxW ? qw - c.maxW : 0;
        if (boxDist2(c.minX, c.minY, c.maxX, c.maxY, qu, qv) + dw * dw > cull2) continue;
        if (!accept(c.axon)) continue;
        let o = store.offset(c.axon, c.first);
        for (let s = 0; s < c.count; s++, o += ps) {
          const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
          if (d2 <= r2 && d2 < best2) {
            best2 = d2;
            bestA = c.axon;
            bestS = c.first + s;
            cull = Math.sqrt(d2) + BOX_SLACK;
            cull2 = cull * cull;
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
    const store = this.store, p = store.xyz, ps = store.pointStep;
    const qu = pick(this.iu, x, y, z), qv = pick(this.iv, x, y, z), qw = pick(this.iw, x, y, z);
    const r2 = r * r;
    const cull = r + BOX_SLACK, cull2 = cull * cull;
    const stack = this.stack;
    let top = 0;
    const root = this.tree.toJSON() as TreeNode;
    if (root.children.length > 0) stack[top++] = root;
    while (top > 0) {
      const node = stack[--top];
      const children = node.children;
      if (!node.leaf) {
        for (let i = 0; i < children.length; i++) {
          const ch = children[i] as TreeNode;
          if (boxDist2(ch.minX, ch.minY, ch.maxX, ch.maxY, qu, qv) <= cull2) stack[top++] = ch;
        }
        continue;
      }
      for (let i = 0; i < children.length; i++) {
        const c = children[i] as Chunk;
        const dw = qw < c.minW ? c.minW - qw : qw > c.maxW ? qw - c.maxW : 0;
        if (boxDist2(c.minX, c.minY, c.maxX, c.maxY, qu, qv) + dw * dw > cull2) continue;
        let o = store.offset(c.axon, c.first);
        for (let s = 0; s < c.count; s++, o += ps) {
          const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
          if (d2 <= r2) visit(c.axon, c.first + s, Math.sqrt(d2));
        }
      }
    }
  }
}

/** Sets the item's box to the tight box t[b..b+5] grown by `pad` on every side. */
function setBox(c: Chunk, t: Float64Array, b: number, pad: number): void {
  c.minX = t[b] - pad;
  c.minY = t[b + 1] - pad;
  c.minW = t[b + 2] - pad;
  c.maxX = t[b + 3] + pad;
  c.maxY = t[b + 4] + pad;
  c.maxW = t[b + 5] + pad;
}

/** Squared distance from (u, v) to the rectangle [minU, maxU] × [minV, maxV] (0 inside). */
function boxDist2(minU: number, minV: number, maxU: number, maxV: number, u: number, v: number): number {
  const du = u < minU ? minU - u : u > maxU ? u - maxU : 0;
  const dv = v < minV ? minV - v : v > maxV ? v - maxV : 0;
  return du * du + dv * dv;
}

/** Coordinate i (0 = x, 1 = y, 2 = z) of (x, y, z), without building an array. */
function pick(i: number, x: number, y: number, z: number): number {
  return i === 0 ? x : i === 1 ? y : z;
}
