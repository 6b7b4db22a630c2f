// Shaft index on a uniform 3D hash grid, all in typed arrays.
//
// Space is cut into cubes of edge `cellSize`. A cell table (open addressing, linear probing)
// maps each occupied cell's 32-bit hash to the head of a singly linked list of blocks of
// entries. A segment is entered in every cell its bounding box touches, so a query visits only
// the cells its own box touches; candidates are measured on the shaft store's points. An entry
// is the segment's key a·stride + s and the segment's bounding box inside the cell, each bound
// rounded down to a sixteenth of the cell edge (boxCode below: six 4-bit bounds, each in a
// 5-bit field). Coordinates are rounded to these box units once, from the grid's origin, and
// both a bound's cell and its place in the cell are read off the unit, so entries and queries
// round alike.
//
// Why the boxes: a search in a crowded bundle reads its home cell whole (about 70 entries on
// average over test/bench/fasciculation.bench.ts, 160 at its end) although, once a near segment
// is found, the answer must lie within a small box round the query point, shrinking with each
// nearer segment found. An entry whose box misses that box is skipped without touching the
// shaft store: three integer operations instead of a cache miss. Replaying that bench's
// searches of its last 8 steps against its final index (15 repeats, one process): 3.32 µs per
// search against 3.90 with masks of the sub-cubes (cell cut 3 × 3 × 3) that the box meets,
// 17 segments measured per search against 38; the masks had measured 2.5–2.8 µs against
// 4.3–4.9 with keys alone (over the whole run).
// Why blocks that double in size along a cell's list (4, 8, 16, … up to MAX_KEYS entries): a
// cell's entries then sit in a few runs of memory instead of many small blocks spread over the
// pool in growth order (all axons append one segment per step, so one cell's segments arrive
// far apart in time).
// Why not copies of the end points in the entries: they made searches about 1.4× faster than
// keys alone, but the pool seven times larger and appends (every cone, every step) twice as
// slow; with the shaft store laid out by point number (shaftIndex.ts) the points a search does
// read mostly sit in a few cached rows anyway.
// Why store the cell's hash in the table: an empty cell then costs one probe and never a walk
// through some other cell's list. Two cells with the same 32-bit hash would share a list; that
// costs distance tests, never a wrong answer, since every candidate is measured exactly.
//
// nearestSegment searches the cell holding the query point first and skips any other cell
// whose cube lies farther than the best distance so far, and inside a cell any entry outside
// the best-so-far box: in a crowded bundle the nearest segment is usually far nearer than r,
// so most cells and entries of the query box are never read. It needs
// no de-duplication (a segment met again through another cell measures the same distance,
// which is no improvement). segmentsWithin marks segments met with a per-query stamp so each
// is reported once.
//
// Appending a segment is O(cells it touches); the pool doubles when full and the cell table
// doubles (rehashing cells only, blocks stay put) above 70 % load, so appends are amortised
// O(1). The grid needs no bounds.

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
/** A block is [next block or −1, entry count, capacity, entry × capacity]; an entry is
 *  [key, box code] (boxCode). */
const HEAD = 3;
const ENTRY = 2;
const FIRST_KEYS = 4;
const MAX_KEYS = 64;

export class HashGridShaftIndex implements ShaftIndex {
  readonly cellSize: number;
  /** BOX_UNITS / cellSize: box units per µm */
  private readonly unitInv: number;
  private readonly store: ShaftStore;
  /** cell table, 2 ints per slot: [cell hash, head block]; head −1 marks an empty slot */
  private cells: Int32Array;
  private cellMask: number;
  private cellsUsed = 0;
  /** block pool: blocks laid end to end from word 0 to poolUsed */
  private pool: Int32Array;
  private poolUsed = 0;
  /** entries made, over all cells (a segment counts once per cell it touches) */
  private entryCount = 0;
  /** stride the entry keys were written with; the store may double it */
  private keyStride: number;
  private stamp: Int32Array;
  private stampValue = 0;
  /** running best of the current nearestSegment query (squared distance, entry key or −1) */
  private best2 = 0;
  private bestKey = -1;

  constructor(opts: ShaftIndexOptions) {
    const cellSize = opts.cellSize ?? DEFAULT_CELL_SIZE;
    if (!(cellSize > 0) || !Number.isFinite(cellSize)) throw new RangeError(`cellSize must be > 0, got ${cellSize}`);
    this.cellSize = cellSize;
    this.unitInv = BOX_UNITS / cellSize;
    this.store = new ShaftStore(opts.axons, opts.maxPointsPerAxon);
    this.keyStride = this.store.stride;
    // Sized for the expected segment count: about 2.2 two-word entries each (a growth step of
    // up to half a cell touches 1–3 cells; measured in test/bench/fasciculation.bench.ts) plus
    // the blocks' headers and unfilled tails, so that a run as announced rarely copies the pool;
    // it doubles when the guess is low. Occupied cells depend on the volume, not known here.
    const expected = Math.max(1024, Math.ceil(opts.axons) * Math.ceil(opts.maxPointsPerAxon));
    this.pool = new Int32Array(7 * expected);
    this.cells = new Int32Array(2 * 4096).fill(-1);
    this.cellMask = 4096 - 1;
    this.stamp = new Int32Array(this.store.axonCapacity * this.store.stride);
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
    if (this.entryCount === 0) return false; // the first step of a run asks every cone of an empty grid
    const u = this.unitInv, e = r + BOX_SLACK;
    const ix0 = cellOfUnit(Math.floor((x - e) * u)), ix1 = cellOfUnit(Math.floor((x + e) * u));
    const iy0 = cellOfUnit(Math.floor((y - e) * u)), iy1 = cellOfUnit(Math.floor((y + e) * u));
    const iz0 = cellOfUnit(Math.floor((z - e) * u)), iz1 = cellOfUnit(Math.floor((z + e) * u));
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return scanNearest(this.store, x, y, z, r, accept, out);
    const cs = this.cellSize;
    this.best2 = r * r;
    this.bestKey = -1;
    const hx = cellOfUnit(Math.floor(x * u)), hy = cellOfUnit(Math.floor(y * u)), hz = cellOfUnit(Math.floor(z * u));
    this.scanCellNearest(this.cellHead(cellHash(hx, hy, hz)), hx, hy, hz, x, y, z, accept);
    for (let k = iz0; k <= iz1; k++) {
      const dz = gap(z, k * cs, cs);
      for (let j = iy0; j <= iy1; j++) {
        const dyz = gap(y, j * cs, cs) ** 2 + dz * dz;
        for (let i = ix0; i <= ix1; i++) {
          // A cell whose cube lies farther than the best distance so far (at most r) holds
          // nothing nearer; the slack keeps a segment on the cube's face from being culled.
          const cull = Math.sqrt(this.best2) + BOX_SLACK;
          if (gap(x, i * cs, cs) ** 2 + dyz > cull * cull || (i === hx && j === hy && k === hz)) continue;
          this.scanCellNearest(this.cellHead(cellHash(i, j, k)), i, j, k, x, y, z, accept);
        }
      }
    }
    const key = this.bestKey;
    if (key >= 0) {
      fillNearest(out, this.store, key >>> this.store.strideShift, key & (this.store.stride - 1), x, y, z, this.best2);
    }
    return out.found;
  }

  segmentsWithin(
    x: number, y: number, z: number, r: number,
    visit: (axon: number, segment: number, distance: number) => void,
  ): void {
    const r2 = r * r;
    const u = this.unitInv, e = r + BOX_SLACK;
    const ix0 = cellOfUnit(Math.floor((x - e) * u)), ix1 = cellOfUnit(Math.floor((x + e) * u));
    const iy0 = cellOfUnit(Math.floor((y - e) * u)), iy1 = cellOfUnit(Math.floor((y + e) * u));
    const iz0 = cellOfUnit(Math.floor((z - e) * u)), iz1 = cellOfUnit(Math.floor((z + e) * u));
    if (this.tooManyCells(ix0, ix1, iy0, iy1, iz0, iz1)) return scanWithin(this.store, x, y, z, r, visit);
    const stamp = this.stamp, st = this.nextStamp();
    const store = this.store, pool = this.pool, p = store.xyz, ps = store.pointStep;
    const shift = store.strideShift, mask = store.stride - 1;
    const cs = this.cellSize, cull2 = (r + BOX_SLACK) ** 2;
    for (let k = iz0; k <= iz1; k++) {
      const dz = gap(z, k * cs, cs);
      for (let j = iy0; j <= iy1; j++) {
        const dyz = gap(y, j * cs, cs) ** 2 + dz * dz;
        for (let i = ix0; i <= ix1; i++) {
          if (gap(x, i * cs, cs) ** 2 + dyz > cull2) continue;
          const near = this.queryCode(x, y, z, e, i, j, k);
          for (let b = this.cellHead(cellHash(i, j, k)); b !== -1; b = pool[b]) {
            for (let q = b + HEAD, end = q + ENTRY * pool[b + 1]; q < end; q += ENTRY) {
              if (!boxesMeet(pool[q + 1], near)) continue;
              const key = pool[q];
              if (stamp[key] === st) continue;
              stamp[key] = st;
              const a = key >>> shift, o = store.offset(a, key & mask);
              const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
              if (d2 > r2) continue;
              visit(a, key & mask, Math.sqrt(d2));
            }
          }
        }
      }
    }
  }

  // -------------------------------------------------------------------------------------------

  /** Scans the blocks of cell (i, j, k) for an accepted segment nearer than best2, updating
   *  best2 and bestKey (the first of equals found, and one exactly at r counts). A segment
   *  whose box in this cell misses the box around (x, y, z) of half-side √best2 is skipped
   *  unread: its part in this cell is farther than the best so far (any nearer part lies in
   *  another cell, where it is entered and measured). */
  private scanCellNearest(
    b: number, i: number, j: number, k: number,
    x: number, y: number, z: number, accept: (axon: number) => boolean,
  ): void {
    const store = this.store, pool = this.pool, p = store.xyz, ps = store.pointStep;
    const shift = store.strideShift, mask = store.stride - 1;
    let best2 = this.best2, bestKey = this.bestKey;
    let e = Math.sqrt(best2) + BOX_SLACK;
    let near = this.queryCode(x, y, z, e, i, j, k);
    for (; b !== -1; b = pool[b]) {
      for (let q = b + HEAD, end = q + ENTRY * pool[b + 1]; q < end; q += ENTRY) {
        if (!boxesMeet(pool[q + 1], near)) continue;
        const key = pool[q];
        const a = key >>> shift, o = store.offset(a, key & mask);
        const d2 = pointSegmentDistanceSq(x, y, z, p[o], p[o + 1], p[o + 2], p[o + ps], p[o + ps + 1], p[o + ps + 2]);
        if (d2 < best2 || (d2 === best2 && bestKey < 0)) {
          if (!accept(a)) continue;
          best2 = d2;
          bestKey = key;
          e = Math.sqrt(d2) + BOX_SLACK;
          near = this.queryCode(x, y, z, e, i, j, k);
        }
      }
    }
    this.best2 = best2;
    this.bestKey = bestKey;
  }

  /** Six bounds within cell (i, j, k) packed for boxesMeet, given in box units counted from the
   *  grid's origin (floor(coordinate · unitInv)): those of a, b, c in the low three 5-bit
   *  fields, BOX_UNITS − 1 minus those of d, e, f in the high three, each first made relative
   *  to the cell and clamped to it. An entry packs its box's upper bounds then its lower ones
   *  (insertSegment writes the same fields inline); a query its lower then its upper. */
  private boxCode(a: number, b: number, c: number, d: number, e: number, f: number, i: number, j: number, k: number): number {
    const ox = i * BOX_UNITS, oy = j * BOX_UNITS, oz = k * BOX_UNITS;
    return inCell(a - ox) | (inCell(b - oy) << 5) | (inCell(c - oz) << 10)
      | ((BOX_UNITS - 1 - inCell(d - ox)) << 15)
      | ((BOX_UNITS - 1 - inCell(e - oy)) << 20)
      | ((BOX_UNITS - 1 - inCell(f - oz)) << 25);
  }

  /** Query code of the box of half-side e around (x, y, z) within cell (i, j, k). */
  private queryCode(x: number, y: number, z: number, e: number, i: number, j: number, k: number): number {
    const u = this.unitInv;
    return this.boxCode(
      Math.floor((x - e) * u), Math.floor((y - e) * u), Math.floor((z - e) * u),
      Math.floor((x + e) * u), Math.floor((y + e) * u), Math.floor((z + e) * u), i, j, k);
  }

  private insertSegment(a: number, s: number): void {
    const p = this.store.xyz;
    const o = this.store.offset(a, s), o1 = o + this.store.pointStep;
    const key = a * this.store.stride + s;
    // the segment's bounding box, grown by the slack so rounding cannot drop a box unit
    const e = BOX_SLACK;
    const x0 = Math.min(p[o], p[o1]) - e, x1 = Math.max(p[o], p[o1]) + e;
    const y0 = Math.min(p[o + 1], p[o1 + 1]) - e, y1 = Math.max(p[o + 1], p[o1 + 1]) + e;
    const z0 = Math.min(p[o + 2], p[o1 + 2]) - e, z1 = Math.max(p[o + 2], p[o1 + 2]) + e;
    // Cells and box bounds both come from the box units: a cell is BOX_UNITS units wide, so
    // the bounds are rounded once per segment, not once per cell it touches. Replaying the
    // appends of test/bench/fasciculation.bench.ts (600,000, 15 repeats, both in one process):
    // 270 and 291 ns per append against 308 and 324 rounding per cell, in two runs.
    const u = this.unitInv;
    const ux0 = Math.floor(x0 * u), ux1 = Math.floor(x1 * u);
    const uy0 = Math.floor(y0 * u), uy1 = Math.floor(y1 * u);
    const uz0 = Math.floor(z0 * u), uz1 = Math.floor(z1 * u);
    const ix0 = cellOfUnit(ux0), ix1 = cellOfUnit(ux1);
    const iy0 = cellOfUnit(uy0), iy1 = cellOfUnit(uy1);
    const iz0 = cellOfUnit(uz0), iz1 = cellOfUnit(uz1);
    // boxCode's fields, written out axis by axis (y and z once per row of cells); only one side
    // needs a clamp: the segment's upper bound is in or past each of its cells, its lower in or
    // before. Why not call boxCode: in the same replay that call measured 1.05–1.07× the time of
    // rounding per cell, this inline form 0.79–0.87×.
    const top = BOX_UNITS - 1;
    for (let k = iz0; k <= iz1; k++) {
      const oz = k * BOX_UNITS, zCode = (Math.min(uz1 - oz, top) << 10) | ((top - Math.max(uz0 - oz, 0)) << 25);
      for (let j = iy0; j <= iy1; j++) {
        const oy = j * BOX_UNITS, yzCode = zCode | (Math.min(uy1 - oy, top) << 5) | ((top - Math.max(uy0 - oy, 0)) << 20);
        for (let i = ix0; i <= ix1; i++) {
          const ox = i * BOX_UNITS;
          this.pushEntry(cellHash(i, j, k), key, yzCode | Math.min(ux1 - ox, top) | ((top - Math.max(ux0 - ox, 0)) << 15));
        }
      }
    }
  }

  /** Head block of the cell with hash h, or −1 if no segment touches it. */
  private cellHead(h: number): number {
    const cells = this.cells, mask = this.cellMask;
    for (let slot = h & mask; ; slot = (slot + 1) & mask) {
      const head = cells[2 * slot + 1];
      if (head === -1 || cells[2 * slot] === h) return head;
    }
  }

  /** Adds segment `key` to the cell with hash h: into the cell's head block, or a new one of
   *  twice that size if it is full. */
  private pushEntry(h: number, key: number, box: number): void {
    const cells = this.cells, mask = this.cellMask;
    let slot = h & mask;
    while (cells[2 * slot + 1] !== -1 && cells[2 * slot] !== h) slot = (slot + 1) & mask;
    let b = cells[2 * slot + 1];
    if (b === -1) {
      cells[2 * slot] = h;
      this.cellsUsed++;
      cells[2 * slot + 1] = b = this.newBlock(-1, FIRST_KEYS);
    } else if (this.pool[b + 1] === this.pool[b + 2]) {
      cells[2 * slot + 1] = b = this.newBlock(b, Math.min(MAX_KEYS, 2 * this.pool[b + 2]));
    }
    const pool = this.pool, q = b + HEAD + ENTRY * pool[b + 1]++;
    pool[q] = key;
    pool[q + 1] = box;
    this.entryCount++;
    if (10 * this.cellsUsed > 7 * (mask + 1)) this.growCells();
  }

  /** Offset of a fresh empty block of `capacity` entries linked to `next` (the pool doubles
   *  when full). */
  private newBlock(next: number, capacity: number): number {
    const size = HEAD + ENTRY * capacity;
    if (this.poolUsed + size > this.pool.length) {
      const grown = new Int32Array(Math.max(2 * this.pool.length, this.poolUsed + size));
      grown.set(this.pool);
      this.pool = grown;
    }
    const b = this.poolUsed;
    this.poolUsed += size;
    this.pool[b] = next;
    this.pool[b + 1] = 0;
    this.pool[b + 2] = capacity;
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
    const pool = this.pool;
    for (let b = 0; b < this.poolUsed; b += HEAD + ENTRY * pool[b + 2]) {
      for (let q = b + HEAD, end = q + ENTRY * pool[b + 1]; q < end; q += ENTRY) {
        const a = (pool[q] / old) | 0;
        pool[q] += a * (stride - old);
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

/** Box bounds are kept in units of cellSize / BOX_UNITS along each axis. */
const BOX_UNITS = 16;
/** Bit 4 of each of the six 5-bit fields of a box or query code. */
const GUARDS = 16 | (16 << 5) | (16 << 10) | (16 << 15) | (16 << 20) | (16 << 25);

/** Do an entry's box and a query box overlap on all three axes? Both are six 4-bit fields, one
 *  to each 5 bits: the entry's (hi_x, hi_y, hi_z, 15 − lo_x, 15 − lo_y, 15 − lo_z), the
 *  query's (lo_x, lo_y, lo_z, 15 − hi_x, 15 − hi_y, 15 − hi_z). Overlap is hi ≥ lo' and
 *  lo ≤ hi' on every axis, i.e. entry field ≥ query field in all six. Setting each entry
 *  field's bit 4 and subtracting the query compares all six at once: a field's bit 4 survives
 *  iff entry ≥ query there, and no field borrows from the next (SIMD within a register; a
 *  common bit trick, no source). Bounds are rounded down on both sides, which keeps order, so
 *  boxes that meet never test apart. */
function boxesMeet(entry: number, query: number): boolean {
  return (((entry | GUARDS) - query) & GUARDS) === GUARDS;
}

/** The cell holding box unit t (exact: t is an integer and BOX_UNITS a power of two). */
function cellOfUnit(t: number): number {
  return Math.floor(t / BOX_UNITS);
}

/** A box unit counted from a cell's corner, clamped to the cell: a box reaching past the cell
 *  counts as touching its border units. */
function inCell(t: number): number {
  return t < 0 ? 0 : t >= BOX_UNITS ? BOX_UNITS - 1 : t;
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
