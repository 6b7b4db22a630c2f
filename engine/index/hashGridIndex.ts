// Shaft index on a uniform 3D hash grid, all in typed arrays.
//
// Space is cut into cubes of edge `cellSize`. A cell table (open addressing, linear probing)
// maps each occupied cell's 32-bit hash to the head of a singly linked list (head / next in
// Int32Arrays) of small blocks of segment keys a·stride + s. A segment is entered in every cell
// its bounding box touches, so a query visits only the cells its own box touches, and a segment
// reached through several cells is skipped after the first by a per-query stamp array.
//
// Why blocks of keys rather than one list node per key: a cell's keys then sit together in
// memory instead of being spread over the whole entry array in growth order (all axons append
// one segment per step, so one cell's segments arrive far apart in time). Queries are bound by
// memory latency, not arithmetic; one cache line per block instead of one per key was about
// 1.5–2× faster per query at 1,000–10,000 axons in a one-off comparison on the scene of
// test/bench/index.bench.ts.
// Why store the cell's hash in the table: an empty cell then costs one probe and never a walk
// through some other cell's list. Two cells with the same 32-bit hash would share a list; that
// costs distance tests, never a wrong answer, since every candidate is measured exactly.
//
// Appending a segment is O(cells it touches); the block pool doubles when full and the cell
// table doubles (rehashing cells only, blocks stay put) above 70 % load, so appends are
// amortised O(1). The grid needs no bounds.

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
import { scanNearest, scanWithin } from './bruteForceIndex.ts';

const DEFAULT_CELL_SIZE = 20; // µm, upper end of the fasciculation radius
/** keys per block; a block is [next, count, key × KEYS] = 8 ints = 32 bytes */
const KEYS = 6;
const BLOCK = KEYS + 2;

export class HashGridShaftIndex implements ShaftIndex {
  readonly cellSize: number;
  private readonly inv: number;
  private readonly store: ShaftStore;
  /** cell table, 2 ints per slot: [cell hash, head block]; head −1 marks an empty slot */
  private cells: Int32Array;
  private cellMask: number;
  private cellsUsed = 0;
  /** block pool: block b is blocks[b·BLOCK ..] = [next block or −1, key count, keys…] */
  private blocks: Int32Array;
  private blockCount = 0;
  /** keys entered, over all cells (a segment counts once per cell it touches) */
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
    // Sized for the expected segment count: short segments (a growth step is a few µm, a cell
    // ~ the query radius) touch 1–2 cells, and half-full blocks are common. Both grow by
    // doubling when the guess is low; occupied cells depend on the volume, not known here.
    const expected = Math.max(1024, Math.ceil(opts.axons) * Math.ceil(opts.maxPointsPerAxon));
    this.blocks = new Int32Array(BLOCK * Math.ceil(expected / 3));
    this.cells = new Int32Array(2 * 4096).fill(-1);
    this.cellMask = 4096 - 1;
    this.stamp = new Int32Array(this.store.axonCapacity * this.store.stride);
  }

  get segmentCount(): number {
    return this.store.segmentCount;
  }

  append(axon: number, x: number, y: number, z: number): void {
    const store = this.store;
    const n = store.append(axon, x, y, z);
    if (store.stride !== this.keyStride) this.rekey(this.keyStride, store.stride);
    if (this.stamp.length < store.axonCapacity * store.stride) {
      this.stamp = new Int32Array(store.axonCapacity * store.stride);
      this.stampValue = 0;
    }
    if (n >= 2) this.insertSegment(axon, n - 2);
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
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return scanNearest(this.store, x, y, z, r, accept, out);
    const stamp = this.stamp, st = this.nextStamp();
    const blocks = this.blocks;
    const p = store.xyz, stride = store.stride;
    const cs = this.cellSize;
    // Cells whose cube lies farther than the best distance so far (at most r) are skipped
    // before their list is touched: the query box's corner cells often are.
    let cull2 = (r + BOX_SLACK) ** 2;
    for (let k = iz0; k <= iz1; k++) {
      const dz = gap(z, k * cs, cs);
      for (let j = iy0; j <= iy1; j++) {
        const dyz = gap(y, j * cs, cs) ** 2 + dz * dz;
        for (let i = ix0; i <= ix1; i++) {
          if (gap(x, i * cs, cs) ** 2 + dyz > cull2) continue;
          for (let b = this.cellHead(cellHash(i, j, k)); b !== -1; b = blocks[b]) {
            for (let q = b + 2, end = b + 2 + blocks[b + 1]; q < end; q++) {
              const key = blocks[q];
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
                cull2 = (Math.sqrt(d2) + BOX_SLACK) ** 2;
              }
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
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return scanWithin(this.store, x, y, z, r, visit);
    const stamp = this.stamp, st = this.nextStamp();
    const blocks = this.blocks;
    const p = store.xyz, stride = store.stride;
    const cs = this.cellSize, cull2 = (r + BOX_SLACK) ** 2;
    for (let k = iz0; k <= iz1; k++) {
      const dz = gap(z, k * cs, cs);
      for (let j = iy0; j <= iy1; j++) {
        const dyz = gap(y, j * cs, cs) ** 2 + dz * dz;
        for (let i = ix0; i <= ix1; i++) {
          if (gap(x, i * cs, cs) ** 2 + dyz > cull2) continue;
          for (let b = this.cellHead(cellHash(i, j, k)); b !== -1; b = blocks[b]) {
            for (let q = b + 2, end = b + 2 + blocks[b + 1]; q < end; q++) {
              const key = blocks[q];
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
        for (let i = ix0; i <= ix1; i++) this.pushEntry(cellHash(i, j, k), key);
      }
    }
  }

  /** Head entry of the cell with hash h, or −1 if no segment touches it. */
  private cellHead(h: number): number {
    const cells = this.cells, mask = this.cellMask;
    for (let slot = h & mask; ; slot = (slot + 1) & mask) {
      const head = cells[2 * slot + 1];
      if (head === -1 || cells[2 * slot] === h) return head;
    }
  }

  /** Adds a key to the cell with hash h: into its head block, or a new block if that is full. */
  private pushEntry(h: number, key: number): void {
    const cells = this.cells, mask = this.cellMask;
    let slot = h & mask;
    while (cells[2 * slot + 1] !== -1 && cells[2 * slot] !== h) slot = (slot + 1) & mask;
    let b = cells[2 * slot + 1];
    if (b === -1) {
      cells[2 * slot] = h;
      this.cellsUsed++;
    }
    if (b === -1 || this.blocks[b + 1] === KEYS) {
      const nb = this.newBlock();
      this.blocks[nb] = b; // next: the older blocks of this cell
      cells[2 * slot + 1] = b = nb;
    }
    this.blocks[b + 2 + this.blocks[b + 1]++] = key;
    this.entryCount++;
    if (10 * this.cellsUsed > 7 * (mask + 1)) this.growCells();
  }

  /** Offset of a fresh empty block (the pool doubles when full). */
  private newBlock(): number {
    if ((this.blockCount + 1) * BLOCK > this.blocks.length) {
      const grown = new Int32Array(this.blocks.length * 2);
      grown.set(this.blocks);
      this.blocks = grown;
    }
    const b = this.blockCount++ * BLOCK;
    this.blocks[b + 1] = 0;
    return b;
  }

  /** Doubles the cell table and re-places every occupied cell; the blocks are untouched. */
  private growCells(): void {
    const old = this.cells;
    const size = 2 * (this.cellMask + 1), mask = size - 1;
    const cells = new Int32Array(2 * size).fill(-1);
    for (let s = 0; s < old.length; s += 2) {
      if (old[s + 1] === -1) continue;
      let slot = old[s] & mask;
      while (cells[2 * slot + 1] !== -1) slot = (slot + 1) & mask;
      cells[2 * slot] = old[s];
      cells[2 * slot + 1] = old[s + 1];
    }
    this.cells = cells;
    this.cellMask = mask;
  }

  /** The store doubled its per-axon stride: rewrite every key a·old + s as a·stride + s. */
  private rekey(old: number, stride: number): void {
    const blocks = this.blocks;
    for (let b = 0; b < this.blockCount * BLOCK; b += BLOCK) {
      for (let q = b + 2, end = b + 2 + blocks[b + 1]; q < end; q++) {
        const a = (blocks[q] / old) | 0;
        blocks[q] += a * (stride - old);
      }
    }
    this.keyStride = stride;
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
}

/** Distance from coordinate v to the interval [lo, lo + size] (0 inside). */
function gap(v: number, lo: number, size: number): number {
  return v < lo ? lo - v : v > lo + size ? v - lo - size : 0;
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
