// Spatial index over growing axon shafts: the interface every implementation honours, the
// shared shaft storage, the point–segment geometry and a factory.
//
// Model: axon a (0..N-1) lays a shaft, a polyline whose points are appended one per growth
// step; segment s of axon a runs from point s to point s+1. Shafts only grow. Queries ask for
// the nearest segment within a radius (fasciculation: pull toward the nearest shaft point and
// align with its tangent) or for every segment within a radius.
//
// Implementations (one file each): rtreeIndex.ts (rbush over boxes of segment chunks),
// hashGridIndex.ts (uniform 3D hash grid on typed arrays), bruteForceIndex.ts (exhaustive scan,
// the reference for tests and the benchmark). They import the helpers below only inside
// functions and constructors, so the import cycle with the factory at the bottom is harmless.

import { BruteForceShaftIndex } from './bruteForceIndex.ts';
import { HashGridShaftIndex } from './hashGridIndex.ts';
import { RTreeShaftIndex } from './rtreeIndex.ts';

/** Reusable out-object, filled by queries, never allocated per query. */
export interface NearestSegment {
  found: boolean;
  axon: number;
  segment: number;
  /** µm from the query point to the closest point on that segment */
  distance: number;
  /** the closest point */
  px: number;
  py: number;
  pz: number;
  /** unit tangent of the segment (point s → s+1); (0,0,0) for a zero-length segment */
  tx: number;
  ty: number;
  tz: number;
}

/** Callbacks (accept, visit) must not append to or query the same index: queries reuse
 *  per-index scratch (stamps, a traversal stack). */
export interface ShaftIndex {
  /** append point (x,y,z) to axon a's shaft (the first call for an axon starts it) */
  append(axon: number, x: number, y: number, z: number): void;
  /** nearest segment within radius r of (x,y,z), skipping axons for which accept(axon) is false
   *  (e.g. itself, incompatible adhesion class); writes into out; returns out.found */
  nearestSegment(
    x: number,
    y: number,
    z: number,
    r: number,
    accept: (axon: number) => boolean,
    out: NearestSegment,
  ): boolean;
  /** calls visit(axon, segment, distance) once for every segment within r of (x,y,z) */
  segmentsWithin(
    x: number,
    y: number,
    z: number,
    r: number,
    visit: (axon: number, segment: number, distance: number) => void,
  ): void;
  readonly segmentCount: number;
  /** the points appended so far, as the index stores them: callers that need shafts (tangents,
   *  metrics) read this one copy rather than keeping a second (append only through the index) */
  readonly shafts: ShaftStore;
}

export type ShaftIndexKind = 'rtree' | 'hashgrid' | 'brute';

export interface ShaftIndexOptions {
  /** expected number of axons (ids 0..axons-1); higher ids are accepted, storage doubles */
  axons: number;
  /** expected maximum points per axon; a longer shaft doubles every axon's capacity (a copy) */
  maxPointsPerAxon: number;
  /** hashgrid: cell edge in µm. Set it to the query radius you use; default 20 µm, the upper
   *  end of the fasciculation radius. */
  cellSize?: number;
  /** rtree: consecutive segments of one axon per box; default 16 */
  chunkSize?: number;
  /** rtree: the plane rbush indexes (it is 2D); the third axis is filtered per chunk. Pick the
   *  plane across the volume's thinnest axis; default 'xy'. */
  projection?: 'xy' | 'xz' | 'yz';
}

export function createShaftIndex(kind: ShaftIndexKind, opts: ShaftIndexOptions): ShaftIndex {
  switch (kind) {
    case 'rtree':
      return new RTreeShaftIndex(opts);
    case 'hashgrid':
      return new HashGridShaftIndex(opts);
    case 'brute':
      return new BruteForceShaftIndex(opts);
    default:
      throw new RangeError(`unknown shaft index kind: ${String(kind)}`);
  }
}

export function createNearestSegment(): NearestSegment {
  return { found: false, axon: -1, segment: -1, distance: Infinity, px: 0, py: 0, pz: 0, tx: 0, ty: 0, tz: 0 };
}

// ---------------------------------------------------------------------------------------------
// Geometry

/** Parameter t ∈ [0, 1] of the point of segment AB closest to P:
 *      t = clamp( ((P − A)·(B − A)) / |B − A|², 0, 1 ),   t = 0 when A = B.
 *  Orthogonal projection onto the line, clamped to the segment (Ericson, Real-Time Collision
 *  Detection, 2005, §5.1.2, from memory). */
export function closestParamOnSegment(
  px: number, py: number, pz: number,
  ax: number, ay: number, az: number,
  bx: number, by: number, bz: number,
): number {
  const ex = bx - ax, ey = by - ay, ez = bz - az;
  const len2 = ex * ex + ey * ey + ez * ez;
  if (len2 === 0) return 0;
  const t = ((px - ax) * ex + (py - ay) * ey + (pz - az) * ez) / len2;
  return t < 0 ? 0 : t > 1 ? 1 : t;
}

/** Squared distance from P to segment AB: |w − t·e|² with w = P − A, e = B − A and t the
 *  clamped parameter of closestParamOnSegment (the same projection, written out here so this
 *  one small function, the innermost of every index's loop, is inlined whole: measured about
 *  1.5× faster per query than calling closestParamOnSegment from it). Squared so hot loops
 *  compare against r² without a square root. */
export function pointSegmentDistanceSq(
  px: number, py: number, pz: number,
  ax: number, ay: number, az: number,
  bx: number, by: number, bz: number,
): number {
  const ex = bx - ax, ey = by - ay, ez = bz - az;
  const wx = px - ax, wy = py - ay, wz = pz - az;
  const len2 = ex * ex + ey * ey + ez * ez;
  const we = wx * ex + wy * ey + wz * ez;
  const t = we <= 0 || len2 === 0 ? 0 : we >= len2 ? 1 : we / len2;
  const dx = wx - t * ex, dy = wy - t * ey, dz = wz - t * ez;
  return dx * dx + dy * dy + dz * dz;
}

/** Distance from P to segment AB, µm. */
export function pointSegmentDistance(
  px: number, py: number, pz: number,
  ax: number, ay: number, az: number,
  bx: number, by: number, bz: number,
): number {
  return Math.sqrt(pointSegmentDistanceSq(px, py, pz, ax, ay, az, bx, by, bz));
}

/** Slack (µm) added to box and cell ranges so a segment whose computed distance is exactly r
 *  is never culled by rounding in a box test; the exact d² ≤ r² test decides membership. */
export const BOX_SLACK = 1e-6;

// ---------------------------------------------------------------------------------------------
// Shared shaft storage

/** Points of every shaft in one Float32Array, laid out by point number: row i holds point i
 *  of every axon, so point i of axon a is at xyz[(i·axonCapacity + a)·3 ..] and the next point
 *  of the same axon `pointStep` floats further on. Every segment has the integer key
 *  a·stride + s (stride: the point capacity per axon, a power of two so that a key splits by
 *  shift and mask, no division, in the indexes' inner loops), whatever the layout.
 *  Why rows by point number: the engine grows every axon one point per step, so one step's
 *  appends fill one row in order, and a follower reading the shafts beside it reads points laid
 *  at about the same step by its neighbours: both stay in a few rows of cache instead of one
 *  cache line per axon across the whole store. Replaying test/bench/fasciculation.bench.ts's
 *  searches and appends: 4.0–4.3 µs per search and 134–200 ns per append, against 5.1–5.5 µs
 *  and 205–232 ns laid out by axon; a layout of 8-segment tiles per axon measured slower in the
 *  whole bench (0.91 against 0.71 CPU s of fasciculation). The cost: a uniform random query's
 *  candidates have their two ends in two rows (README: a few per cent to a quarter slower).
 *  Why float32: a shaft point is then kept to 2⁻²⁴ of its coordinate, under 1 nm anywhere in a
 *  10 mm volume and far below a growth cone's size, at half the memory. Every index measures
 *  the stored (rounded) points, so all of them, brute force included, give identical answers. */
export class ShaftStore {
  xyz: Float32Array;
  /** points appended per axon */
  pointCount: Int32Array;
  /** point capacity per axon (rows), 2^strideShift; doubles when an axon outgrows it */
  stride: number;
  strideShift: number;
  /** axons per row; doubles (re-laying every row) when a higher axon id arrives */
  axonCapacity: number;
  /** floats from one point of an axon to its next: 3·axonCapacity */
  pointStep: number;
  /** 1 + the highest axon id appended so far */
  axonCount = 0;
  segmentCount = 0;
  /** the longest shaft's point count: rows in use */
  rowsUsed = 0;

  constructor(axons: number, maxPointsPerAxon: number) {
    this.axonCapacity = Math.max(1, Math.ceil(axons));
    this.strideShift = Math.max(1, Math.ceil(Math.log2(Math.max(2, Math.ceil(maxPointsPerAxon)))));
    this.stride = 2 ** this.strideShift;
    checkKeyRange(this.axonCapacity, this.stride);
    this.pointStep = 3 * this.axonCapacity;
    this.xyz = new Float32Array(this.axonCapacity * this.stride * 3);
    this.pointCount = new Int32Array(this.axonCapacity);
  }

  /** Appends a point and returns the axon's new point count (≥ 2 means a segment was added). */
  append(a: number, x: number, y: number, z: number): number {
    if (!Number.isInteger(a) || a < 0) throw new RangeError(`axon id must be a non-negative integer, got ${a}`);
    if (!Number.isFinite(Math.fround(x)) || !Number.isFinite(Math.fround(y)) || !Number.isFinite(Math.fround(z))) {
      throw new RangeError(`shaft point of axon ${a} is not finite in float32: (${x}, ${y}, ${z})`);
    }
    if (a >= this.axonCapacity) this.growAxons(Math.max(a + 1, this.axonCapacity * 2));
    const n = this.pointCount[a];
    if (n === this.stride) this.growStride(this.stride * 2);
    const o = n * this.pointStep + 3 * a;
    this.xyz[o] = x;
    this.xyz[o + 1] = y;
    this.xyz[o + 2] = z;
    this.pointCount[a] = n + 1;
    if (n + 1 > this.rowsUsed) this.rowsUsed = n + 1;
    if (a >= this.axonCount) this.axonCount = a + 1;
    if (n >= 1) this.segmentCount++;
    return n + 1;
  }

  /** Is (x, y, z), rounded as it would be stored, axon a's last point? */
  isLastPoint(a: number, x: number, y: number, z: number): boolean {
    const n = a < this.axonCapacity ? this.pointCount[a] : 0;
    if (n === 0) return false;
    const o = (n - 1) * this.pointStep + 3 * a, p = this.xyz;
    return p[o] === Math.fround(x) && p[o + 1] === Math.fround(y) && p[o + 2] === Math.fround(z);
  }

  /** Offset into xyz of point i of axon a; point i + 1 is at offset + pointStep. */
  offset(a: number, i: number): number {
    return i * this.pointStep + 3 * a;
  }

  private growAxons(capacity: number): void {
    checkKeyRange(capacity, this.stride);
    const xyz = new Float32Array(capacity * this.stride * 3);
    const oldStep = this.pointStep, step = 3 * capacity;
    for (let i = 0; i < this.rowsUsed; i++) xyz.set(this.xyz.subarray(i * oldStep, (i + 1) * oldStep), i * step);
    const count = new Int32Array(capacity);
    count.set(this.pointCount);
    this.xyz = xyz;
    this.pointCount = count;
    this.axonCapacity = capacity;
    this.pointStep = step;
  }

  /** More rows: the layout is unchanged, so the old rows are copied as they are. */
  private growStride(stride: number): void {
    checkKeyRange(this.axonCapacity, stride);
    const xyz = new Float32Array(this.axonCapacity * stride * 3);
    xyz.set(this.xyz);
    this.xyz = xyz;
    this.stride = stride;
    this.strideShift++;
  }
}

/** Segment keys a·stride + s live in Int32Arrays. */
function checkKeyRange(axons: number, stride: number): void {
  if (axons * stride > 0x7fffffff) {
    throw new RangeError(`shaft storage too large: ${axons} axons × ${stride} points exceeds 2^31 segment keys`);
  }
}

/** Fills `out` with segment s of axon a as seen from (x, y, z); shared by every
 *  implementation so they report identical numbers for the same segment. */
export function fillNearest(
  out: NearestSegment, store: ShaftStore, a: number, s: number,
  x: number, y: number, z: number, d2: number,
): void {
  const p = store.xyz;
  const o = store.offset(a, s), o1 = o + store.pointStep;
  const ax = p[o], ay = p[o + 1], az = p[o + 2];
  const bx = p[o1], by = p[o1 + 1], bz = p[o1 + 2];
  const t = closestParamOnSegment(x, y, z, ax, ay, az, bx, by, bz);
  const ex = bx - ax, ey = by - ay, ez = bz - az;
  // sqrt, not Math.hypot (about 15× slower in V8, measured): points are float32, so the
  // shortest non-zero segment is ~1e-45 µm and its squared length cannot underflow a double
  const len = Math.sqrt(ex * ex + ey * ey + ez * ez);
  out.found = true;
  out.axon = a;
  out.segment = s;
  out.distance = Math.sqrt(d2);
  out.px = ax + t * ex;
  out.py = ay + t * ey;
  out.pz = az + t * ez;
  if (len > 0) {
    out.tx = ex / len;
    out.ty = ey / len;
    out.tz = ez / len;
  } else {
    out.tx = out.ty = out.tz = 0;
  }
}

/** Marks `out` empty. */
export function clearNearest(out: NearestSegment): void {
  out.found = false;
  out.axon = -1;
  out.segment = -1;
  out.distance = Infinity;
}
