// The targeting rule: what growth cones do once they contact their target sheet, and how well
// the resulting map matches the expected one.
//
// A cone of a population with a `mapping` block that reaches its target sheet is snapped onto
// the sheet and from then on moves within it, in the sheet's own (u, v), under its stop rule
// (balance.ts: Gierer's gradient balance; affinity.ts: Koulakov & Tsigankov's stochastic energy
// updates), both reading the chemoaffinity energy of signals.ts and, when competition is on,
// the terminal density of competition.ts. A terminal settles (status "terminated") after
// `maxHours` in the sheet or, when `settleDistance` is given, as soon as the mean of its
// positions over one window of `settleSteps` steps lies within `settleDistance` of the previous
// window's mean (the jitter of sensing noise and stochastic moves averages out of a window
// mean, drift does not). It settles at its last window's mean, its termination zone. Its final (u, v) is its termination; the map metrics (engine/map) compare those with
// the expected map and go into run.json (metrics.map) and axons.csv.
import type { World } from '../../sim/simulate.ts';
import type { GrowthRule } from '../../sim/rules.ts';
import type { ConePopulation } from '../cones.ts';
import type { Mapping } from '../../scene/schema.ts';
import { Sheet } from '../../geometry/regions.ts';
import { STATUS_CODE, AXON_STATUS } from '../../io/runFormat.ts';
import { compileSignals, chemoEnergy, type SignalSet } from './signals.ts';
import { balanceStep, type BalanceCone } from './balance.ts';
import { acceptance, proposeMove } from './affinity.ts';
import { TerminalCompetition, defaultCompetitionRadius } from './competition.ts';
import { mapSummary, type MapSummary } from '../../map/metrics.ts';
import { axesPlacement, referencePlacement, pairingOf, type ExpectedPlacement } from '../../map/expected.ts';
import { readTerminations } from '../../map/reference.ts';

const TERMINATED = STATUS_CODE.terminated;
/** default ectopic threshold: this share of the target sheet's longer edge */
export const DEFAULT_ECTOPIC_SHARE = 0.15;

interface PopTargeting {
  sheet: Sheet;
  mapping: Mapping;
  signals: SignalSet;
  cone: BalanceCone;
  stepLength: number;
  competition?: TerminalCompetition;
  weight: number; // γ
  radius: number; // µm
  settleSteps: number;
  settleDistance: number;
  maxSteps: number;
  /** orthonormal axes of the sheet's plane */
  e1: Float64Array;
  e2: Float64Array;
}

/** RULE_FACTORIES entry: active when a population maps onto a sheet or the scene states an
 *  expected map. */
export function targetingRule(world: World): GrowthRule | undefined {
  if (!world.populations.some((p) => p.spec.mapping) && !world.scene.expectedMap) return undefined;
  return new TargetingRule(world);
}

interface MapResult {
  tu: Float64Array; tv: Float64Array; eu: Float64Array; ev: Float64Array;
  errorUm: Float64Array; ectopic: Float64Array; ectopicUm: Float64Array;
  mapped: Uint8Array; // 1: ended on its target sheet; 2: its population targets a sheet but it did not get there
}

class TargetingRule implements GrowthRule {
  readonly name = 'targeting';
  private readonly w: World;
  private readonly byPop: (PopTargeting | undefined)[];
  private readonly competitions: TerminalCompetition[] = [];
  private readonly placement: ExpectedPlacement;
  private readonly onSheet: Uint8Array;
  private readonly u: Float64Array;
  private readonly v: Float64Array;
  private readonly sheetSteps: Uint32Array;
  /** sums of (u, v) over the current settle window, and the previous window's mean */
  private readonly sumU: Float64Array;
  private readonly sumV: Float64Array;
  private readonly prevU: Float64Array;
  private readonly prevV: Float64Array;
  private readonly energy: Float64Array;
  private readonly grad = new Float64Array(3);
  private readonly rep = new Float64Array(3);
  private readonly move = new Float64Array(3);
  private readonly p3 = new Float64Array(3);
  private readonly uvw = new Float64Array(3);
  private result: MapResult | undefined;

  constructor(world: World) {
    this.w = world;
    const n = world.cones.count;
    this.onSheet = new Uint8Array(n);
    this.u = new Float64Array(n);
    this.v = new Float64Array(n);
    this.sheetSteps = new Uint32Array(n);
    this.sumU = new Float64Array(n);
    this.sumV = new Float64Array(n);
    this.prevU = new Float64Array(n).fill(NaN);
    this.prevV = new Float64Array(n).fill(NaN);
    this.energy = new Float64Array(n);
    const expected = world.scene.expectedMap;
    // a reference run is read now, so a bad one fails before anything is simulated
    this.placement = expected?.reference ? referencePlacement(readTerminations(expected.reference)) : axesPlacement(pairingOf(expected));
    this.byPop = world.populations.map((p) => this.compile(p));
  }

  private compile(pop: ConePopulation): PopTargeting | undefined {
    const m = pop.spec.mapping;
    if (!m || !(pop.target instanceof Sheet)) return undefined;
    const sheet = pop.target;
    const { dt } = this.w.scene.growth;
    const onSameSheet = this.w.populations.filter((q) => q.spec.mapping && q.target === sheet);
    const radius = m.competition?.radius ?? defaultCompetitionRadius(sheet, onSameSheet.reduce((s, q) => s + q.count, 0));
    let competition: TerminalCompetition | undefined;
    if (m.competition && m.competition.weight > 0) {
      competition = this.competitions.find((c) => c.sheet === sheet);
      if (!competition) {
        competition = new TerminalCompetition(sheet, radius, onSameSheet.reduce((s, q) => s + q.count, 0));
        this.competitions.push(competition);
      }
    }
    const e1 = Float64Array.from(sheet.U, (x) => x / sheet.uLength);
    const nrm = sheet.normal;
    const e2 = Float64Array.of(nrm[1] * e1[2] - nrm[2] * e1[1], nrm[2] * e1[0] - nrm[0] * e1[2], nrm[0] * e1[1] - nrm[1] * e1[0]);
    const stepLength = (m.speed ?? pop.spec.speed) * dt;
    return {
      sheet, mapping: m, signals: compileSignals(pop, m.signals, this.w.fields),
      cone: { diameter: pop.spec.sensing.coneDiameter, receptors: pop.spec.sensing.receptorCount, saturation: pop.spec.sensing.saturation, stepLength },
      stepLength, competition, weight: m.competition?.weight ?? 0, radius,
      settleSteps: m.settleSteps, settleDistance: m.settleDistance ?? -1,
      // whole windows, so a terminal that runs out of time settles at a window's mean too
      maxSteps: m.settleSteps * Math.max(1, Math.ceil(m.maxHours / dt / m.settleSteps)),
      e1, e2,
    };
  }

  beforeStep(): void {
    const { cones } = this.w;
    for (const c of this.competitions) {
      c.clear();
      for (const pop of this.w.populations) {
        if (this.byPop[pop.index]?.sheet !== c.sheet) continue;
        for (let i = pop.first; i < pop.first + pop.count; i++) {
          if (this.onSheet[i]) c.add(i, cones.position[3 * i], cones.position[3 * i + 1], cones.position[3 * i + 2]);
        }
      }
      c.commit();
    }
  }

  reached(i: number, pop: ConePopulation): boolean {
    const t = this.byPop[pop.index];
    if (!t) return false;
    const { cones } = this.w;
    const uvw = this.uvw, p = this.p3;
    t.sheet.coords(cones.position[3 * i], cones.position[3 * i + 1], cones.position[3 * i + 2], uvw);
    const u = clamp01(uvw[0]), v = clamp01(uvw[1]);
    this.u[i] = u; this.v[i] = v;
    t.sheet.point(u, v, 0, p);
    cones.position.set(p, 3 * i);
    this.onSheet[i] = 1;
    if (t.mapping.rule === 'affinity') this.energy[i] = this.chemo(t, i, p[0], p[1], p[2]);
    return true;
  }

  advance(i: number, pop: ConePopulation): boolean {
    if (this.onSheet[i] === 0) return false;
    const t = this.byPop[pop.index]!;
    const { cones } = this.w;
    const k = 3 * i;
    const x = cones.position[k], y = cones.position[k + 1], z = cones.position[k + 2];
    const mv = this.move, p = this.p3;
    let u = this.u[i], v = this.v[i];
    let moved = false;
    if (t.mapping.rule === 'balance') {
      const rep = this.rep;
      if (t.competition) {
        t.competition.repulsion(i, x, y, z, t.radius, rep);
        rep[0] *= t.weight; rep[1] *= t.weight; rep[2] *= t.weight;
      } else rep[0] = rep[1] = rep[2] = 0;
      balanceStep(t.signals, cones.receptorLevel, i * cones.receptorStride, x, y, z, t.e1, t.e2, rep, t.cone, cones.rng[i], this.grad, mv);
      u = clamp01(u + dot(mv, t.sheet.Ud));
      v = clamp01(v + dot(mv, t.sheet.Vd));
      moved = true;
    } else if (t.competition && t.mapping.exchange > 0 && cones.rng[i]() < t.mapping.exchange) {
      this.exchange(i, t, x, y, z);
      u = this.u[i]; v = this.v[i];
      moved = true;
    } else {
      proposeMove(t.e1, t.e2, t.stepLength, cones.rng[i], mv);
      const nu = u + dot(mv, t.sheet.Ud), nv = v + dot(mv, t.sheet.Vd);
      if (nu >= 0 && nu <= 1 && nv >= 0 && nv <= 1) {
        t.sheet.point(nu, nv, 0, p);
        const e = this.chemo(t, i, p[0], p[1], p[2]);
        let dE = e - this.energy[i];
        if (t.competition) dE += t.weight * t.competition.densityChange(i, x, y, z, p[0], p[1], p[2], t.radius);
        if (cones.rng[i]() < acceptance(dE, t.mapping.temperature)) {
          u = nu; v = nv; this.energy[i] = e;
          moved = true;
        }
      }
    }
    if (moved) {
      t.sheet.point(u, v, 0, p);
      const dx = p[0] - x, dy = p[1] - y, dz = p[2] - z;
      const d = Math.sqrt(dx * dx + dy * dy + dz * dz);
      if (d > 0) {
        cones.heading[k] = dx / d; cones.heading[k + 1] = dy / d; cones.heading[k + 2] = dz / d;
        cones.pathLength[i] += d;
      }
      cones.position[k] = p[0]; cones.position[k + 1] = p[1]; cones.position[k + 2] = p[2];
      this.u[i] = u; this.v[i] = v;
    }
    cones.steps[i]++;
    this.sumU[i] += u; this.sumV[i] += v;
    const s = ++this.sheetSteps[i];
    if (s % t.settleSteps === 0) {
      const mu = this.sumU[i] / t.settleSteps, mv2 = this.sumV[i] / t.settleSteps;
      this.sumU[i] = this.sumV[i] = 0;
      if (s >= t.maxSteps || sheetDistance(t.sheet, mu - this.prevU[i], mv2 - this.prevV[i]) < t.settleDistance) this.settle(i, t, mu, mv2);
      this.prevU[i] = mu; this.prevV[i] = mv2;
    }
    return true;
  }

  /** Koulakov & Tsigankov's exchange move: i proposes to swap places with a random terminal j
   *  within the competition radius. The set of occupied places, and so the competition energy,
   *  is unchanged; ΔE = E_i(x_j) + E_j(x_i) − E_i(x_i) − E_j(x_j), accepted with the same
   *  probability as a move. It lets terminals pass each other where space is crowded. A settled
   *  terminal can be swapped: it moves, but stays settled. */
  private exchange(i: number, t: PopTargeting, x: number, y: number, z: number): void {
    const { cones } = this.w;
    const j = t.competition!.randomNeighbour(i, x, y, z, t.radius, cones.rng[i]);
    if (j < 0) return;
    const tj = this.byPop[cones.population[j]];
    if (!tj || tj.sheet !== t.sheet) return;
    const k = 3 * j;
    const xj = cones.position[k], yj = cones.position[k + 1], zj = cones.position[k + 2];
    const eiAtJ = this.chemo(t, i, xj, yj, zj), ejAtI = this.chemo(tj, j, x, y, z);
    const ej = tj.mapping.rule === 'affinity' ? this.energy[j] : this.chemo(tj, j, xj, yj, zj);
    const dE = eiAtJ + ejAtI - this.energy[i] - ej;
    if (!(cones.rng[i]() < acceptance(dE, t.mapping.temperature))) return;
    const uj = this.u[j], vj = this.v[j];
    this.u[j] = this.u[i]; this.v[j] = this.v[i];
    this.u[i] = uj; this.v[i] = vj;
    this.energy[i] = eiAtJ; this.energy[j] = ejAtI;
    cones.position[k] = x; cones.position[k + 1] = y; cones.position[k + 2] = z;
  }

  /** ends axon i's movement at (u, v) on its sheet */
  private settle(i: number, t: PopTargeting, u: number, v: number): void {
    const { cones } = this.w;
    this.u[i] = u; this.v[i] = v;
    t.sheet.point(u, v, 0, this.p3);
    cones.position.set(this.p3, 3 * i);
    cones.status[i] = TERMINATED;
  }

  metrics(): Record<string, unknown> {
    const r = this.results();
    const { populations, cones } = this.w;
    const select = (keep: (i: number) => boolean) => {
      const idx: number[] = [];
      for (let i = 0; i < cones.count; i++) if (r.mapped[i] === 1 && keep(i)) idx.push(i);
      const pick = (a: ArrayLike<number>) => Float64Array.from(idx, (i) => a[i]);
      return { su: pick(cones.sourceU), sv: pick(cones.sourceV), tu: pick(r.tu), tv: pick(r.tv), errorUm: pick(r.errorUm), ectopic: pick(r.ectopic), group: pick(cones.population) };
    };
    const pairing = pairingOf(this.w.scene.expectedMap);
    const bins = this.w.scene.expectedMap?.bins ?? 10;
    const map = mapSummary(select(() => true), pairing, bins);
    let mappedAxons = 0, unmappedAxons = 0;
    for (let i = 0; i < cones.count; i++) { if (r.mapped[i] === 1) mappedAxons++; else if (r.mapped[i] === 2) unmappedAxons++; }
    const byPopulation: Record<string, MapSummary> = {};
    const sheetPops = populations.filter((p) => p.target instanceof Sheet);
    if (sheetPops.length > 1) for (const p of sheetPops) byPopulation[p.name] = mapSummary(select((i) => cones.population[i] === p.index), pairing, bins);
    const thresholds: Record<string, number> = {};
    for (const p of sheetPops) thresholds[p.target!.name] = ectopicThreshold(this.w, p.target as Sheet);
    return {
      map,
      mapInfo: {
        mappedAxons, unmappedAxons,
        expected: this.placement.kind, reference: this.w.scene.expectedMap?.reference, pairing,
        ectopicUm: thresholds,
        ...(sheetPops.length > 1 ? { populations: byPopulation } : {}),
      },
    };
  }

  axonColumns(): { name: string; values: ArrayLike<number | string> }[] {
    const r = this.results();
    const n = this.w.cones.count;
    const col = (a: Float64Array, digits: number) => {
      const out = new Array<number | string>(n);
      const f = 10 ** digits;
      for (let i = 0; i < n; i++) out[i] = Number.isFinite(a[i]) ? Math.round(a[i] * f) / f : '';
      return out;
    };
    return [
      { name: 'target_u', values: col(r.tu, 6) },
      { name: 'target_v', values: col(r.tv, 6) },
      { name: 'expected_u', values: col(r.eu, 6) },
      { name: 'expected_v', values: col(r.ev, 6) },
      { name: 'error_um', values: col(r.errorUm, 3) },
      { name: 'ectopic', values: col(r.ectopic, 0) },
    ];
  }

  /** Per-axon termination, expected place and error, computed once after the run. */
  private results(): MapResult {
    if (this.result) return this.result;
    const { cones, populations } = this.w;
    const n = cones.count;
    const nan = () => new Float64Array(n).fill(NaN);
    const r: MapResult = { tu: nan(), tv: nan(), eu: nan(), ev: nan(), errorUm: nan(), ectopic: nan(), ectopicUm: nan(), mapped: new Uint8Array(n) };
    const out = new Float64Array(2), uvw = this.uvw;
    for (const pop of populations) {
      if (!(pop.target instanceof Sheet)) continue;
      const sheet = pop.target;
      const threshold = ectopicThreshold(this.w, sheet);
      for (let i = pop.first; i < pop.first + pop.count; i++) {
        this.placement.place(cones.sourceU[i], cones.sourceV[i], out);
        r.eu[i] = out[0]; r.ev[i] = out[1];
        let tu = NaN, tv = NaN;
        const status = AXON_STATUS[cones.status[i]];
        if (this.onSheet[i]) { tu = this.u[i]; tv = this.v[i]; }
        else if (status === 'reached' || status === 'terminated') {
          sheet.coords(cones.position[3 * i], cones.position[3 * i + 1], cones.position[3 * i + 2], uvw);
          tu = clamp01(uvw[0]); tv = clamp01(uvw[1]);
        }
        if (!Number.isFinite(tu)) { r.mapped[i] = 2; continue; }
        r.mapped[i] = 1;
        r.tu[i] = tu; r.tv[i] = tv;
        r.errorUm[i] = sheetDistance(sheet, tu - out[0], tv - out[1]);
        r.ectopicUm[i] = threshold;
        r.ectopic[i] = r.errorUm[i] > threshold ? 1 : 0;
      }
    }
    this.result = r;
    return r;
  }

  private chemo(t: PopTargeting, i: number, x: number, y: number, z: number): number {
    const { cones } = this.w;
    return chemoEnergy(t.signals, cones.receptorLevel, i * cones.receptorStride, x, y, z, this.grad);
  }
}

/** The scene's ectopic threshold, or DEFAULT_ECTOPIC_SHARE of the sheet's longer edge, µm. */
export function ectopicThreshold(world: World, sheet: Sheet): number {
  return world.scene.expectedMap?.ectopicUm ?? DEFAULT_ECTOPIC_SHARE * Math.max(sheet.uLength, sheet.vLength);
}

/** |Δu·U + Δv·V|, µm */
function sheetDistance(s: Sheet, du: number, dv: number): number {
  const x = du * s.U[0] + dv * s.V[0], y = du * s.U[1] + dv * s.V[1], z = du * s.U[2] + dv * s.V[2];
  return Math.sqrt(x * x + y * y + z * z);
}

function dot(a: Float64Array, b: Float64Array): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

function clamp01(t: number): number {
  return t < 0 ? 0 : t > 1 ? 1 : t;
}
