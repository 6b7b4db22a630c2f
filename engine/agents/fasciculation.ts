// Fasciculation: growth cones follow the shafts of earlier axons, and leave them where guidance
// tells them to.
//
// A growing cone of a population with an `adhesion` block looks for the nearest shaft segment,
// within its capture radius r_f, of another axon of a class it adheres to (see Search below).
// If there is one, with closest point q and direction t̂, the steering sum h (simulate.ts) gains
//
//     w_f·f,    f = w_p·u⊥/r_f + w_t·σ·t̂,    u = q − x,   u⊥ = u − (u·t̂)·t̂,
//                                             σ = +1 if t̂·d ≥ 0 else −1
//
// x: the cone's position, d: its heading, w_f the population's adhesion weight, w_p and w_t the
// pull and alignment weights. t̂ is the shaft's direction over a few steps, the unit chord from
// point s − K to point s + 1 + K around the nearest segment s (K = TANGENT_WINDOW, clipped at the
// shaft's ends): a single segment carries its own axon's step-to-step noise, and a follower
// aligning with that noise would turn back at every zigzag. The pull u⊥/r_f is a spring toward
// the shaft's line: full length at the edge of the capture radius and vanishing on the shaft, so
// a cone that has joined a bundle is held in it rather than jerked across it each step. Only its
// part across the shaft acts (u⊥; u itself when the closest point is interior): where the closest
// point is a segment's end, at a shaft's tip or a kink, u would also point back along the shaft
// and turn the cone round. The alignment carries the cone along the shaft in whichever direction
// it already heads. (Modelling choices, common practice, no source; science.md §3–4 gives the
// term's place in the steering sum.)
//
// Defasciculation. Call g = h − β·d the guidance signal: everything in the steering sum other
// than persistence (cue terms, wall push, rules that steered before this one), and split it along
// and across the shaft, g⊥ = g − (g·t̂)·t̂. With a = w_f·f the adhesion term,
//
//     held     |g⊥| ≤ θ·|a|:   h ← h − g⊥ + a
//     released |g⊥| > θ·|a|:   h unchanged
//
// While held, the bundle resists guidance across it (like static friction, up to the breaking
// strength θ·|a|, θ the population's release factor); guidance along the shaft is kept, since it
// agrees with the bundle. Where the guidance across the shaft outweighs that strength, the cone
// lets go for the step and steers by its cues alone. The rule is stateless: a cone that let go is
// held again as soon as the guidance across the shaft weakens while it is still within r_f.
//
// Index. One shaft per adhesive axon, ids compacted to 0..n−1 over the populations with an
// adhesion block. Each step's moves are queued in `moved` and appended in the next step's
// `beforeStep`, so every cone of a step sees every shaft as it stood when the step began: the run
// does not depend on the order axons are processed in (an invariant of the engine), and the
// index is updated incrementally, never rebuilt. Only cones that grow this step query; the hot
// path allocates nothing (one reused NearestSegment, one accept callback, typed arrays).
//
// Search. A cone that found a shaft holds it: next step it looks only at the held shaft's
// segments around the last nearest one (nearestOnShaft), and searches the index again each time
// it has grown RESEARCH_RADII capture radii (RESEARCH_RADII·r_f of shaft) since its last search,
// or as soon as it has lost the held shaft. The interval is a length, not a step count, so a
// run's behaviour does not hang on the time step; the first interval is staggered over the axons
// (golden-ratio offsets) so the searches do not all fall on one step. A search starts from the
// held shaft's distance d as its radius (nearestFromHint: the nearest within r_f lies within
// d). So "nearest" above means: the held shaft, replaced by a nearer one at the next search.
// Measured in test/bench/fasciculation.bench.ts's scene (10,000 axons × 60 steps of 10 µm
// converging into one crowded bundle): following instead of an index query every step cut the
// step loop from 6.6 to 2.5 CPU s; a search every 5·r_f (75 µm, 7.5 steps) instead of every 4
// steps cut the fasciculation share of it by about a fifth more (0.80 to 0.65 CPU s, best of 5).
//
// When. A step's nearest shafts are all found in beforeStep, before any cone moves
// (findShafts): the held shafts followed in shaft id order, then the index searches sorted by
// home cell, a search without a held shaft's bound taking the answer of the search before it
// (a nearby cone's shaft) as its bound instead. steer reads the answer. The answers are those
// each cone would get asking as it steers, since shafts, positions and held shafts all stand as
// the step began (checked bit for bit in test/fasciculation/bundles.test.ts). Why: searches in
// one cell then find its entries in cache, and the sensing loop runs without the index's memory
// passing through the cache between its cones. Measured in the same benchmark, in one process
// against asking cone by cone, 10 repeats interleaved, identical paths: the step loop took 0.91
// of the time (fasciculation cost, median, 0.93 → 0.84 CPU s); the neighbour's bound, 8
// repeats: a further 0.96 (0.74 → 0.70 s).
//
// Which index serves the hot path: the hash grid (cell edge = the largest r_f), by measurement in
// the same benchmark at 2,000 axons (median of 3): fasciculation cost 0.12 CPU s of the step loop
// on the hash grid against 2.2 s on the R-tree, end-of-run metrics 0.04 s against 1.1 s (a
// likely reason: the R-tree indexes a 2D projection and filters the third axis chunk by chunk,
// and a bundle's chunk boxes overlap). Hash cells of r_f/2, r_f/3 and 2·r_f measured slower.
// test/bench/index.bench.ts agrees at uniform density (nearest segment within 15 µm, 500 steps
// per axon): 8.6 µs per query on the hash grid against 32 on the R-tree at 1,000 axons, 10.2
// against 73 at 10,000.

import type { World } from '../sim/simulate.ts';
import type { GrowthRule } from '../sim/rules.ts';
import { type ConePopulation, GROWING, WAITING } from './cones.ts';
import {
  type ShaftIndex, type ShaftIndexKind, type NearestSegment,
  ShaftStore, createShaftIndex, createNearestSegment,
} from '../index/shaftIndex.ts';
import { fasciculationMetrics, nearestFromHint, nearestOnShaft, HINT_WINDOW, type FasciculationMetrics } from '../metrics/fasciculation.ts';

/** Segments either side of the nearest one that set the shaft direction t̂ (see the header). */
export const TANGENT_WINDOW = 2;
/** A cone holding a shaft searches the index for a nearer one each time it has grown this many
 *  capture radii since its last search (see the header). */
export const RESEARCH_RADII = 5;

/** The index behind the steering queries (chosen by measurement, see the header). */
export const HOT_INDEX: ShaftIndexKind = 'hashgrid';

/** Rule factory for RULE_FACTORIES: undefined unless some population has an adhesion block. */
export function fasciculationRule(world: World): GrowthRule | undefined {
  return makeFasciculationRule(world, HOT_INDEX);
}

/** Options of the rule that change how it computes, never what (tests compare them). */
export interface FasciculationOptions {
  /** find every cone's nearest shaft at the start of the step (findShafts), rather than cone
   *  by cone as each steers; default true */
  findAhead?: boolean;
}

/** The same rule on a chosen index (benchmarks and tests compare them). */
export function makeFasciculationRule(world: World, kind: ShaftIndexKind, options: FasciculationOptions = {}): FasciculationRule | undefined {
  if (!world.populations.some((p) => p.spec.adhesion)) return undefined;
  return new FasciculationRule(world, kind, options);
}

// ---------------------------------------------------------------------------------------------
// Physics: small pure functions.

/** f = w_p·u⊥/r_f + w_t·σ·t̂ with u = q − x, u⊥ = u − (u·t̂)·t̂ and σ = sign(t̂·d) (+1 on a tie),
 *  written to out[0..2]. x: cone position; d: heading; q: nearest shaft point; t̂: its unit
 *  tangent (0 for a zero-length segment, when u⊥ = u and only the pull acts). */
export function adhesionTerm(
  x: number, y: number, z: number,
  dx: number, dy: number, dz: number,
  qx: number, qy: number, qz: number,
  tx: number, ty: number, tz: number,
  radius: number, pull: number, align: number,
  out: Float64Array,
): void {
  const ux = qx - x, uy = qy - y, uz = qz - z;
  const ut = ux * tx + uy * ty + uz * tz;
  const k = pull / radius;
  const s = tx * dx + ty * dy + tz * dz >= 0 ? align : -align;
  out[0] = k * (ux - ut * tx) + s * tx;
  out[1] = k * (uy - ut * ty) + s * ty;
  out[2] = k * (uz - ut * tz) + s * tz;
}

/** g⊥ = g − (g·t̂)·t̂: the part of guidance g across a shaft of unit tangent t̂ (all of g
 *  when t̂ = 0), written to out[0..2]. */
export function acrossShaft(
  gx: number, gy: number, gz: number,
  tx: number, ty: number, tz: number,
  out: Float64Array,
): void {
  const gt = gx * tx + gy * ty + gz * tz;
  out[0] = gx - gt * tx;
  out[1] = gy - gt * ty;
  out[2] = gz - gt * tz;
}

/** Defasciculation test |g⊥| > θ·|a|: does the guidance across the shaft g⊥ outweigh the
 *  adhesion term a = w_f·f by the release factor θ? (Squared, no root.) */
export function releases(
  px: number, py: number, pz: number,
  ax: number, ay: number, az: number,
  theta: number,
): boolean {
  return px * px + py * py + pz * pz > theta * theta * (ax * ax + ay * ay + az * az);
}

/** Unit chord of axon a's shaft from point s − k to point s + 1 + k (clipped to the shaft),
 *  written to out; (0, 0, 0) when those points coincide. */
export function shaftDirection(shafts: ShaftStore, a: number, s: number, k: number, out: Float64Array): void {
  const last = shafts.pointCount[a] - 1;
  const i0 = s - k < 0 ? 0 : s - k, i1 = s + 1 + k > last ? last : s + 1 + k;
  const p = shafts.xyz, o0 = shafts.offset(a, i0), o1 = shafts.offset(a, i1);
  const ex = p[o1] - p[o0], ey = p[o1 + 1] - p[o0 + 1], ez = p[o1 + 2] - p[o0 + 2];
  const len = Math.sqrt(ex * ex + ey * ey + ez * ez);
  if (len > 0) {
    out[0] = ex / len; out[1] = ey / len; out[2] = ez / len;
  } else {
    out[0] = out[1] = out[2] = 0;
  }
}

// ---------------------------------------------------------------------------------------------

export class FasciculationRule implements GrowthRule {
  readonly name = 'fasciculation';
  readonly kind: ShaftIndexKind;
  /** shafts by compact id (tangents, metrics): the index's own store, appended through the index */
  readonly shafts: ShaftStore;
  readonly index: ShaftIndex;
  /** cone i → shaft id, −1 for axons of populations without adhesion */
  readonly idOf: Int32Array;
  /** shaft id → cone i */
  readonly axonOf: Int32Array;
  private readonly world: World;
  private readonly classCount: number;
  /** shaft id → adhesion class index */
  private readonly classOf: Int32Array;
  /** [population × class] = 1 where that population adheres to that class */
  private readonly compat: Uint8Array;
  /** per population (by index): w_f, w_p, w_t, r_f, θ; w_f < 0 marks no adhesion block */
  private readonly weight: Float64Array;
  private readonly pull: Float64Array;
  private readonly align: Float64Array;
  private readonly radius: Float64Array;
  private readonly release: Float64Array;
  /** per shaft id: steps steered by adhesion, and steps where a shaft was in reach but the cone let go */
  private readonly attachedSteps: Uint32Array;
  private readonly releasedSteps: Uint32Array;
  /** shaft ids moved this step, appended at the next beforeStep */
  private readonly pending: Int32Array;
  private pendingCount = 0;
  private readonly started: Uint8Array;
  /** per shaft id: last step's nearest shaft and segment (−1: none), the hint that bounds this
   *  step's search (nearestFromHint: same answer, a much smaller search box for a riding cone) */
  private readonly lastAxon: Int32Array;
  private readonly lastSegment: Int32Array;
  /** per shaft id: µm grown since the last index search, and the length that calls the next */
  private readonly sinceSearch: Float32Array;
  private readonly searchEvery: Float32Array;
  private readonly near: NearestSegment = createNearestSegment();
  /** per shaft id, this step's nearest shaft as findShafts left it for steer: the step it was
   *  found for, its axon (−1: none) and segment, whether an index search found it, and its
   *  closest point q and direction t̂ (6 per id) */
  private readonly foundStep: Int32Array;
  private readonly foundAxon: Int32Array;
  private readonly foundSegment: Int32Array;
  private readonly foundBySearch: Uint8Array;
  private readonly foundGeometry: Float64Array;
  /** sort keys of a step's searches: home cell, then shaft id */
  private readonly searchKeys: Float64Array;
  private readonly idBits: number;
  private readonly cellInv: number;
  private step = -1;
  private readonly findAhead: boolean;
  private readonly f = new Float64Array(3);
  private readonly t = new Float64Array(3);
  private readonly gp = new Float64Array(3);
  /** the query's own id and compat row, read by `accept` (made once, not per query) */
  private qSelf = -1;
  private qRow = 0;
  private readonly accept: (id: number) => boolean;
  private result: FasciculationMetrics | undefined;

  constructor(world: World, kind: ShaftIndexKind, options: FasciculationOptions = {}) {
    this.world = world;
    this.findAhead = options.findAhead ?? true;
    this.kind = kind;
    const { cones, populations } = world;
    const adhesive = populations.filter((p) => p.spec.adhesion);
    const classes = [...new Set(adhesive.map((p) => p.spec.adhesion!.class))];
    this.classCount = classes.length;

    const P = populations.length;
    this.weight = new Float64Array(P).fill(-1);
    this.pull = new Float64Array(P);
    this.align = new Float64Array(P);
    this.radius = new Float64Array(P);
    this.release = new Float64Array(P);
    this.compat = new Uint8Array(P * this.classCount);
    for (const p of adhesive) {
      const a = p.spec.adhesion!;
      this.weight[p.index] = a.weight;
      this.pull[p.index] = a.pull;
      this.align[p.index] = a.align;
      this.radius[p.index] = a.radius;
      this.release[p.index] = a.release;
      for (const c of a.adheresTo) {
        const k = classes.indexOf(c);
        if (k >= 0) this.compat[p.index * this.classCount + k] = 1;
      }
    }

    const n = adhesive.reduce((s, p) => s + p.count, 0);
    this.idOf = new Int32Array(cones.count).fill(-1);
    this.axonOf = new Int32Array(n);
    this.classOf = new Int32Array(n);
    let id = 0;
    for (const p of adhesive) {
      const k = classes.indexOf(p.spec.adhesion!.class);
      for (let i = p.first; i < p.first + p.count; i++, id++) {
        this.idOf[i] = id;
        this.axonOf[id] = i;
        this.classOf[id] = k;
      }
    }

    // A point per step plus the seed point; the store doubles if an axon outgrows it.
    const maxPoints = Math.min(world.steps + 1, 4096);
    const cellSize = Math.max(...adhesive.map((p) => p.spec.adhesion!.radius));
    this.index = createShaftIndex(kind, { axons: Math.max(1, n), maxPointsPerAxon: maxPoints, cellSize });
    this.shafts = this.index.shafts;
    this.attachedSteps = new Uint32Array(n);
    this.releasedSteps = new Uint32Array(n);
    this.pending = new Int32Array(n);
    this.started = new Uint8Array(n);
    this.lastAxon = new Int32Array(n).fill(-1);
    this.lastSegment = new Int32Array(n);
    this.sinceSearch = new Float32Array(n);
    this.searchEvery = new Float32Array(n);
    for (let id = 0; id < n; id++) {
      const every = RESEARCH_RADII * this.radius[cones.population[this.axonOf[id]]];
      this.searchEvery[id] = every;
      this.sinceSearch[id] = every * ((id * 0.6180339887498949) % 1); // staggered first interval
    }
    this.foundStep = new Int32Array(n).fill(-1);
    this.foundAxon = new Int32Array(n);
    this.foundSegment = new Int32Array(n);
    this.foundBySearch = new Uint8Array(n);
    this.foundGeometry = new Float64Array(6 * n);
    this.searchKeys = new Float64Array(n);
    this.idBits = Math.max(1, Math.ceil(Math.log2(n + 1)));
    this.cellInv = 1 / cellSize;
    this.accept = (other: number) => other !== this.qSelf && this.compat[this.qRow + this.classOf[other]] === 1;
  }

  beforeStep(step: number): void {
    this.flush();
    this.step = step;
    if (this.findAhead) this.findShafts(step);
  }

  steer(i: number, pop: ConePopulation, x: number, y: number, z: number, h: Float64Array): void {
    const P = pop.index;
    const wf = this.weight[P];
    if (wf <= 0) return; // no adhesion block (−1) or adhesion switched off (0)
    const self = this.idOf[i];
    // findShafts found it at the start of the step; a cone it did not expect is served now
    if (this.foundStep[self] !== this.step && !this.follow(self, x, y, z)) this.search(self, x, y, z, -1, 0);
    if (this.foundBySearch[self] === 1) this.sinceSearch[self] = 0;
    const a = this.foundAxon[self];
    if (a < 0) {
      this.lastAxon[self] = -1;
      return;
    }
    this.lastAxon[self] = a;
    this.lastSegment[self] = this.foundSegment[self];

    const heading = this.world.cones.heading, o = 3 * i;
    const dx = heading[o], dy = heading[o + 1], dz = heading[o + 2];
    const f = this.f, g = this.foundGeometry, k = 6 * self;
    const tx = g[k + 3], ty = g[k + 4], tz = g[k + 5];
    adhesionTerm(x, y, z, dx, dy, dz, g[k], g[k + 1], g[k + 2], tx, ty, tz, this.radius[P], this.pull[P], this.align[P], f);
    const ax = wf * f[0], ay = wf * f[1], az = wf * f[2];
    const beta = pop.spec.persistence;
    const gx = h[0] - beta * dx, gy = h[1] - beta * dy, gz = h[2] - beta * dz;
    const gp = this.gp;
    acrossShaft(gx, gy, gz, tx, ty, tz, gp);
    if (releases(gp[0], gp[1], gp[2], ax, ay, az, this.release[P])) {
      this.releasedSteps[self]++;
      return;
    }
    this.attachedSteps[self]++;
    h[0] += ax - gp[0]; h[1] += ay - gp[1]; h[2] += az - gp[2];
  }

  moved(i: number, _pop: ConePopulation, x0: number, y0: number, z0: number): void {
    const id = this.idOf[i];
    if (id < 0) return;
    if (this.started[id] === 0) {
      // the seed point: alone it is no segment, so appending it now is invisible to queries
      this.started[id] = 1;
      this.appendPoint(id, x0, y0, z0);
    }
    this.pending[this.pendingCount++] = id;
    const pos = this.world.cones.position, o = 3 * i;
    const dx = pos[o] - x0, dy = pos[o + 1] - y0, dz = pos[o + 2] - z0;
    this.sinceSearch[id] += Math.sqrt(dx * dx + dy * dy + dz * dz);
  }

  finish(): void {
    this.flush();
    const pops = this.world.populations.filter((p) => p.spec.adhesion);
    const radius = new Float64Array(this.axonOf.length);
    for (let id = 0; id < radius.length; id++) radius[id] = this.radius[this.world.cones.population[this.axonOf[id]]];
    const cones = this.world.cones;
    this.result = fasciculationMetrics({
      shafts: this.shafts,
      index: this.index,
      radius,
      adheres: (a, b) => this.compat[cones.population[this.axonOf[a]] * this.classCount + this.classOf[b]] === 1,
      groups: pops.map((p) => ({ name: p.name, from: this.idOf[p.first], to: this.idOf[p.first] + p.count })),
    });
  }

  metrics(): Record<string, unknown> {
    if (!this.result) this.finish();
    let attached = 0, released = 0;
    for (let id = 0; id < this.attachedSteps.length; id++) {
      attached += this.attachedSteps[id];
      released += this.releasedSteps[id];
    }
    return {
      fasciculation: {
        ...this.result,
        radiusUm: Object.fromEntries(this.world.populations.filter((p) => p.spec.adhesion).map((p) => [p.name, p.spec.adhesion!.radius])),
        attachedSteps: attached,
        releasedSteps: released,
        segments: this.index.segmentCount,
        index: this.kind,
      },
    };
  }

  axonColumns(): { name: string; values: ArrayLike<number | string> }[] {
    const n = this.world.cones.count;
    const attached = new Float64Array(n), released = new Float64Array(n);
    for (let id = 0; id < this.axonOf.length; id++) {
      attached[this.axonOf[id]] = this.attachedSteps[id];
      released[this.axonOf[id]] = this.releasedSteps[id];
    }
    return [
      { name: 'fasciculated_steps', values: attached },
      { name: 'released_steps', values: released },
    ];
  }

  // -------------------------------------------------------------------------------------------

  /** Finds the nearest shaft of every cone that will steer this step, before any moves, for
   *  steer to read: the held shaft followed in shaft id order, then the index searches (held
   *  shaft lost, interval up, or none held) sorted by home cell, so that searches in one cell
   *  find its entries and candidates in cache. The same answers as found cone by cone in
   *  steer: the shafts, the cones' positions and their held shafts are all as they stood when
   *  the step began. It touches none of the rule's state, which steer updates. */
  private findShafts(step: number): void {
    const { cones, populations } = this.world;
    const pos = cones.position, keys = this.searchKeys, inv = this.cellInv;
    const idScale = 2 ** this.idBits, cellBits = Math.floor((52 - this.idBits) / 3), cellMask = 2 ** cellBits - 1;
    let m = 0;
    for (let id = 0; id < this.axonOf.length; id++) {
      const i = this.axonOf[id], st = cones.status[i], pop = populations[cones.population[i]];
      if (!(st === GROWING || (st === WAITING && step >= pop.startStep)) || this.weight[pop.index] <= 0) continue;
      const o = 3 * i, x = pos[o], y = pos[o + 1], z = pos[o + 2];
      if (this.follow(id, x, y, z)) continue;
      const cx = Math.floor(x * inv) & cellMask, cy = Math.floor(y * inv) & cellMask, cz = Math.floor(z * inv) & cellMask;
      keys[m++] = ((cx * (cellMask + 1) + cy) * (cellMask + 1) + cz) * idScale + id;
    }
    const sorted = keys.subarray(0, m).sort();
    let nearAxon = -1, nearSegment = 0;
    for (let k = 0; k < m; k++) {
      const id = sorted[k] % idScale, o = 3 * this.axonOf[id];
      this.search(id, pos[o], pos[o + 1], pos[o + 2], nearAxon, nearSegment);
      if (this.foundAxon[id] >= 0) {
        nearAxon = this.foundAxon[id];
        nearSegment = this.foundSegment[id];
      }
    }
  }

  /** Between searches a cone follows the shaft it held last step: its nearest segment near the
   *  last one. False where the search interval is up, no shaft is held, or the held one is out
   *  of reach: then the index is searched. */
  private follow(id: number, x: number, y: number, z: number): boolean {
    const held = this.lastAxon[id];
    if (held < 0 || this.sinceSearch[id] >= this.searchEvery[id]) return false;
    const r = this.radius[this.world.cones.population[this.axonOf[id]]];
    if (!nearestOnShaft(this.shafts, x, y, z, r, held, this.lastSegment[id], HINT_WINDOW, this.near)) return false;
    this.keepFound(id, true, 0);
    return true;
  }

  /** Index search, from the held shaft's distance where the interval is up (the nearest
   *  within r_f lies within it). Where the held shaft was lost or none is held, from the
   *  distance of shaft nearAxon's segments around nearSegment, if it is one the cone adheres
   *  to (findShafts passes the answer of the search before, nearby in its order), else from
   *  r_f. Either bound leaves the answer as it is (nearestFromHint). */
  private search(id: number, x: number, y: number, z: number, nearAxon: number, nearSegment: number): void {
    const P = this.world.cones.population[this.axonOf[id]];
    const held = this.lastAxon[id];
    this.qSelf = id;
    this.qRow = P * this.classCount;
    let hint = -1, hintSegment = 0;
    if (held >= 0 && this.sinceSearch[id] >= this.searchEvery[id]) {
      hint = held;
      hintSegment = this.lastSegment[id];
    } else if (nearAxon >= 0 && this.accept(nearAxon)) {
      hint = nearAxon;
      hintSegment = nearSegment;
    }
    const found = nearestFromHint(this.index, this.shafts, x, y, z, this.radius[P], this.accept, hint, hintSegment, HINT_WINDOW, this.near);
    this.keepFound(id, found, 1);
  }

  /** Records this.near as shaft id's answer for this step, with the shaft direction there. */
  private keepFound(id: number, found: boolean, bySearch: number): void {
    this.foundStep[id] = this.step;
    this.foundBySearch[id] = bySearch;
    if (!found) {
      this.foundAxon[id] = -1;
      return;
    }
    const near = this.near, g = this.foundGeometry, k = 6 * id, t = this.t;
    this.foundAxon[id] = near.axon;
    this.foundSegment[id] = near.segment;
    shaftDirection(this.shafts, near.axon, near.segment, TANGENT_WINDOW, t);
    g[k] = near.px; g[k + 1] = near.py; g[k + 2] = near.pz;
    g[k + 3] = t[0]; g[k + 4] = t[1]; g[k + 5] = t[2];
  }

  /** Appends each queued cone's current position (where its last step ended). */
  private flush(): void {
    const pos = this.world.cones.position;
    for (let k = 0; k < this.pendingCount; k++) {
      const id = this.pending[k];
      const o = 3 * this.axonOf[id];
      this.appendPoint(id, pos[o], pos[o + 1], pos[o + 2]);
    }
    this.pendingCount = 0;
  }

  /** Appends to the index, skipping a repeat of the last point (a cone a wall held back). */
  private appendPoint(id: number, x: number, y: number, z: number): void {
    if (!this.shafts.isLastPoint(id, x, y, z)) this.index.append(id, x, y, z);
  }
}
