// The step loop. It owns time and nothing else: fields, regions and cone state are built
// before it starts, and each physical rule it applies is a small function in engine/agents.
import type { Scene, Edit } from '../scene/schema.ts';
import { compileRegions, type CompiledRegion, Sheet } from '../geometry/regions.ts';
import { buildFields, type CueField, type BuildContext } from '../fields/index.ts';
import { seedCones, ConeState, GROWING, WAITING, type ConePopulation } from '../agents/cones.ts';
import { sensedGradientOccupancy, sensedGradientFilopodia, adaptLevel } from '../agents/sensing.ts';
import { sampleVonMisesFisher, wallPush } from '../agents/steering.ts';
import { STATUS_CODE } from '../io/runFormat.ts';
import { buildRules, type GrowthRule } from './rules.ts';

const REACHED = STATUS_CODE.reached;
const STALLED = STATUS_CODE.stalled;
const EXITED = STATUS_CODE.exited;
const MAX_STEPS = STATUS_CODE['max-steps'];
const INTERRUPTED = STATUS_CODE.interrupted;

export interface World {
  scene: Scene;
  regions: Map<string, CompiledRegion>;
  fields: CueField[];
  fieldIndex: Map<string, number>;
  fieldContext: BuildContext;
  cones: ConeState;
  populations: ConePopulation[];
  walls: CompiledRegion[];
  steps: number;
  /** behaviours beyond cue sensing (see rules.ts), built from the scene */
  rules: GrowthRule[];
}

export interface WorldOptions {
  axons?: number;
  steps?: number;
  edits?: Edit[];
  onProgress?: (message: string, fraction: number) => void;
}

export function buildWorld(scene: Scene, opts: WorldOptions = {}): World {
  const regions = compileRegions(scene.regions);
  const { fields: fieldMap, ctx } = buildFields(scene, regions, opts.onProgress);
  const fields = [...fieldMap.values()];
  const fieldIndex = new Map(fields.map((f, i) => [f.name, i]));
  const { cones, populations } = seedCones(scene, regions, { axons: opts.axons, edits: opts.edits ?? [], fieldIndex });
  const walls = [...regions.values()].filter((r) => !r.permissive);
  const world: World = { scene, regions, fields, fieldIndex, fieldContext: ctx, cones, populations, walls, steps: opts.steps ?? scene.growth.steps, rules: [] };
  world.rules = buildRules(world);
  return world;
}

export interface SimHooks {
  /** called with every stored frame (float32 xyz per axon); the array is reused between calls */
  onFrame?(frame: number, step: number, positions: Float32Array): void;
  onStep?(step: number, total: number): void;
  /** polled once per step; true stops the run cleanly with status "interrupted" */
  shouldStop?(): boolean;
}

export interface SimResult {
  stepsRun: number;
  frames: number;
  frameSteps: number[];
  interrupted: boolean;
}

/** Runs the scene's growth to the step limit (or until every axon stops or shouldStop()).
 *  Yields to the event loop every ~50 ms so signals (Ctrl-C) and progress output get through. */
export async function simulate(world: World, hooks: SimHooks = {}): Promise<SimResult> {
  const { cones, scene } = world;
  const g = scene.growth;
  const frameBuf = new Float32Array(3 * cones.count);
  const frameSteps: number[] = [];
  const emit = (step: number) => {
    for (let i = 0; i < frameBuf.length; i++) frameBuf[i] = cones.position[i];
    hooks.onFrame?.(frameSteps.length, step, frameBuf);
    frameSteps.push(step);
  };

  const stepper = new Stepper(world);
  emit(0);
  let step = 0;
  let interrupted = false;
  let lastYield = performance.now();
  while (step < world.steps) {
    if (performance.now() - lastYield > 50) {
      await new Promise<void>((resolve) => setImmediate(resolve));
      lastYield = performance.now();
    }
    if (hooks.shouldStop?.()) {
      interrupted = true;
      break;
    }
    const active = stepper.step(step);
    step++;
    if (step % g.frameEvery === 0) emit(step);
    hooks.onStep?.(step, world.steps);
    if (active === 0 && !stepper.anyWaiting(step)) break;
  }
  if (frameSteps[frameSteps.length - 1] !== step) emit(step);
  for (const r of world.rules) r.finish?.(step);
  // whatever is still growing ends with the reason the loop ended
  const end = interrupted ? INTERRUPTED : MAX_STEPS;
  for (let i = 0; i < cones.count; i++) if (cones.status[i] === GROWING) cones.status[i] = end;
  return { stepsRun: step, frames: frameSteps.length, frameSteps, interrupted };
}

/** One step for every axon. Scratch arrays are allocated once, here, not per step. */
class Stepper {
  private readonly grad = new Float64Array(3);
  private readonly sensed = new Float64Array(3);
  private readonly normal = new Float64Array(3);
  private readonly dirOut = new Float64Array(3);
  private readonly uvw = new Float64Array(3);
  private readonly tips = new Float64Array(4 * 64);
  private readonly w: World;
  private readonly size: Float64Array;
  private readonly tipField: { field: CueField; grad: Float64Array };
  private readonly sampleTip: (x: number, y: number, z: number) => number;
  private readonly h = new Float64Array(3);
  private readonly advanceRules: GrowthRule[];
  private readonly steerRules: GrowthRule[];
  private readonly movedRules: GrowthRule[];
  private readonly reachedRules: GrowthRule[];

  constructor(world: World) {
    this.w = world;
    this.size = Float64Array.from(world.scene.volume.size);
    this.tipField = { field: world.fields[0], grad: new Float64Array(3) };
    const tf = this.tipField;
    this.sampleTip = (x, y, z) => tf.field.sample(x, y, z, tf.grad);
    this.advanceRules = world.rules.filter((r) => r.advance);
    this.steerRules = world.rules.filter((r) => r.steer);
    this.movedRules = world.rules.filter((r) => r.moved);
    this.reachedRules = world.rules.filter((r) => r.reached);
  }

  anyWaiting(step: number): boolean {
    return this.w.populations.some((p) => p.startStep > step && p.count > 0);
  }

  /** Advances every growing cone one step; returns how many are still growing. */
  step(step: number): number {
    const { cones, populations } = this.w;
    for (const r of this.w.rules) r.beforeStep?.(step);
    let active = 0;
    for (const pop of populations) {
      if (step < pop.startStep) continue;
      const end = pop.first + pop.count;
      if (step === pop.startStep) for (let i = pop.first; i < end; i++) if (cones.status[i] === WAITING) cones.status[i] = GROWING;
      for (let i = pop.first; i < end; i++) {
        if (cones.status[i] !== GROWING) continue;
        if (!this.advanceByRule(i, pop, step)) this.advance(i, pop, step);
        if (cones.status[i] === GROWING) active++;
      }
    }
    return active;
  }

  private advanceByRule(i: number, pop: ConePopulation, step: number): boolean {
    const rules = this.advanceRules;
    for (let r = 0; r < rules.length; r++) if (rules[r].advance!(i, pop, step)) return true;
    return false;
  }

  private advance(i: number, pop: ConePopulation, step: number): void {
    const { cones, fields, scene } = this.w;
    const g = scene.growth;
    const spec = pop.spec;
    const sens = spec.sensing;
    const rng = cones.rng[i];
    const p = 3 * i;
    const x = cones.position[p], y = cones.position[p + 1], z = cones.position[p + 2];
    const dx = cones.heading[p], dy = cones.heading[p + 1], dz = cones.heading[p + 2];
    const grad = this.grad, sensed = this.sensed;

    // h = β·d + Σ wᵢ sᵢ Rᵢ ĝᵢ + w_b·b   (see engine/agents/steering.ts)
    let hx = spec.persistence * dx, hy = spec.persistence * dy, hz = spec.persistence * dz;
    const R = pop.receptorField.length;
    const base = i * cones.receptorStride;
    const dtOverTau = sens.adaptationHours ? g.dt / sens.adaptationHours : 0;
    for (let r = 0; r < R; r++) {
      const level = cones.receptorLevel[base + r];
      if (level === 0) continue;
      const field = fields[pop.receptorField[r]];
      const c = field.sample(x, y, z, grad);
      let kd = pop.receptorKd[r];
      if (dtOverTau > 0) {
        const m = cones.adaptation[base + r];
        kd += m;
        cones.adaptation[base + r] = adaptLevel(m, c, dtOverTau);
      }
      if (c <= 0 && grad[0] === 0 && grad[1] === 0 && grad[2] === 0) continue;
      if (sens.mode === 'occupancy') {
        sensedGradientOccupancy(c, grad[0], grad[1], grad[2], kd, sens.receptorCount, sens.coneDiameter, sens.saturation, rng, sensed, 0);
      } else {
        this.tipField.field = field;
        sensedGradientFilopodia(this.sampleTip, x, y, z, dx, dy, dz, kd, sens.receptorCount, sens.filopodia, sens.filopodiumLength, sens.saturation, rng, this.tips, sensed, 0);
      }
      const k = pop.receptorGain[r] * level;
      hx += k * sensed[0]; hy += k * sensed[1]; hz += k * sensed[2];
    }

    // walls and the volume boundary push back within the margin: b = Σ (1 − d/margin)·n
    const margin = g.wallMargin, ww = g.wallWeight;
    if (ww > 0) {
      const n = this.normal;
      const walls = this.w.walls;
      for (let wi = 0; wi < walls.length; wi++) {
        const d = walls[wi].distance(x, y, z, n);
        const f = ww * wallPush(d, margin);
        if (f > 0) { hx += f * n[0]; hy += f * n[1]; hz += f * n[2]; }
      }
      const s = this.size;
      if (x < margin) hx += ww * wallPush(x, margin);
      if (s[0] - x < margin) hx -= ww * wallPush(s[0] - x, margin);
      if (y < margin) hy += ww * wallPush(y, margin);
      if (s[1] - y < margin) hy -= ww * wallPush(s[1] - y, margin);
      if (z < margin) hz += ww * wallPush(z, margin);
      if (s[2] - z < margin) hz -= ww * wallPush(s[2] - z, margin);
    }

    const steer = this.steerRules;
    if (steer.length) {
      const h = this.h;
      h[0] = hx; h[1] = hy; h[2] = hz;
      for (let r = 0; r < steer.length; r++) steer[r].steer!(i, pop, x, y, z, h);
      hx = h[0]; hy = h[1]; hz = h[2];
    }

    let hl = Math.sqrt(hx * hx + hy * hy + hz * hz);
    if (hl < 1e-12) { hx = dx; hy = dy; hz = dz; hl = 1; }
    const out = this.dirOut;
    sampleVonMisesFisher(hx / hl, hy / hl, hz / hl, spec.kappa, rng, out, 0);
    let nx = out[0], ny = out[1], nz = out[2];

    const len = pop.stepLength;
    let px = x + len * nx, py = y + len * ny, pz = z + len * nz;

    // a wall cannot be entered: stay put and turn away (reflect the heading off its surface)
    const walls = this.w.walls;
    for (let wi = 0; wi < walls.length; wi++) {
      const wall = walls[wi];
      if (this.blocks(wall, x, y, z, px, py, pz)) {
        const n = this.normal;
        wall.distance(x, y, z, n);
        const dn = nx * n[0] + ny * n[1] + nz * n[2];
        if (dn < 0) { nx -= 2 * dn * n[0]; ny -= 2 * dn * n[1]; nz -= 2 * dn * n[2]; }
        px = x; py = y; pz = z;
        break;
      }
    }

    cones.heading[p] = nx; cones.heading[p + 1] = ny; cones.heading[p + 2] = nz;
    const dist = Math.sqrt((px - x) * (px - x) + (py - y) * (py - y) + (pz - z) * (pz - z));
    const s = this.size;
    if (px < 0 || py < 0 || pz < 0 || px > s[0] || py > s[1] || pz > s[2]) {
      px = clamp(px, 0, s[0]); py = clamp(py, 0, s[1]); pz = clamp(pz, 0, s[2]);
      cones.status[i] = EXITED;
    }
    cones.position[p] = px; cones.position[p + 1] = py; cones.position[p + 2] = pz;
    cones.pathLength[i] += dist;
    const steps = ++cones.steps[i];
    const moved = this.movedRules;
    for (let r = 0; r < moved.length; r++) moved[r].moved!(i, pop, x, y, z);

    if (pop.target && cones.status[i] === GROWING && this.reaches(pop.target, x, y, z, px, py, pz, len)) {
      cones.status[i] = REACHED;
      const rr = this.reachedRules;
      for (let r = 0; r < rr.length; r++) if (rr[r].reached!(i, pop, step)) { cones.status[i] = GROWING; break; }
    }

    if (cones.status[i] === GROWING && steps % g.stallSteps === 0) {
      const c = cones.checkpoint;
      const ex = px - c[p], ey = py - c[p + 1], ez = pz - c[p + 2];
      if (ex * ex + ey * ey + ez * ez < g.stallDistance * g.stallDistance) cones.status[i] = STALLED;
      c[p] = px; c[p + 1] = py; c[p + 2] = pz;
    }
  }

  /** does the step from a to b end inside the wall, or cross it if it is a sheet? */
  private blocks(wall: CompiledRegion, ax: number, ay: number, az: number, bx: number, by: number, bz: number): boolean {
    if (wall instanceof Sheet) return this.crossesSheet(wall, ax, ay, az, bx, by, bz, 0);
    return wall.contains(bx, by, bz);
  }

  private reaches(t: CompiledRegion, ax: number, ay: number, az: number, bx: number, by: number, bz: number, len: number): boolean {
    if (t instanceof Sheet) return t.contains(bx, by, bz, Math.max(len, 5)) || this.crossesSheet(t, ax, ay, az, bx, by, bz, 0);
    return t.contains(bx, by, bz);
  }

  /** the segment a→b passes through the sheet's plane within its (u, v) square (or ends within `thickness` of it) */
  private crossesSheet(s: Sheet, ax: number, ay: number, az: number, bx: number, by: number, bz: number, thickness: number): boolean {
    const uvw = this.uvw;
    s.coords(ax, ay, az, uvw);
    const wa = uvw[2];
    s.coords(bx, by, bz, uvw);
    const wb = uvw[2];
    if (Math.abs(wb) <= thickness) return uvw[0] >= 0 && uvw[0] <= 1 && uvw[1] >= 0 && uvw[1] <= 1;
    if (wa * wb > 0) return false;
    const t = wa / (wa - wb);
    s.coords(ax + t * (bx - ax), ay + t * (by - ay), az + t * (bz - az), uvw);
    return uvw[0] >= 0 && uvw[0] <= 1 && uvw[1] >= 0 && uvw[1] <= 1;
  }
}

function clamp(v: number, lo: number, hi: number): number {
  return v < lo ? lo : v > hi ? hi : v;
}
