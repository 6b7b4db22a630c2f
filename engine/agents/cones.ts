// Growth-cone state as a structure of typed arrays, and the populations that seed it.
// Axon i of the run belongs to exactly one population; populations own their parameters and
// receptor tables, the arrays here own every per-axon number.
import type { Scene, Population, Edit } from '../scene/schema.ts';
import type { CompiledRegion, Sheet } from '../geometry/regions.ts';
import { profileLevel } from '../fields/profile.ts';
import { STATUS_CODE } from '../io/runFormat.ts';
import { axonStream, stream, sampleIndices, type Uniform } from './random.ts';

export const GROWING = STATUS_CODE.growing;
export const WAITING = STATUS_CODE.waiting;

/** A population compiled for the step loop. */
export interface ConePopulation {
  readonly name: string;
  readonly index: number;
  readonly first: number;
  readonly count: number;
  readonly spec: Population;
  readonly source: Sheet;
  readonly target?: CompiledRegion;
  readonly startStep: number;
  readonly stepLength: number; // v·Δt, µm
  /** receptor r: which field it binds (index into the run's field list), its K_d and its
   *  signed steering weight s·w (s = +1 attract, −1 repel) */
  readonly receptorNames: string[];
  readonly receptorField: Int32Array;
  readonly receptorKd: Float64Array;
  readonly receptorGain: Float64Array;
}

export class ConeState {
  readonly count: number;
  /** receptors stored per axon (the most any population has) */
  readonly receptorStride: number;
  readonly position: Float64Array; // xyz per axon, µm
  readonly heading: Float64Array; // unit xyz per axon
  readonly checkpoint: Float64Array; // position at the last stall check
  readonly status: Uint8Array;
  readonly steps: Uint32Array; // steps grown
  readonly pathLength: Float64Array; // µm
  readonly population: Uint16Array;
  readonly sourceU: Float64Array;
  readonly sourceV: Float64Array;
  readonly knockin: Uint8Array;
  readonly receptorLevel: Float64Array; // [axon × receptorStride]
  readonly adaptation: Float64Array; // adapted level m per [axon × receptorStride]
  readonly rng: Uniform[];

  constructor(count: number, receptorStride: number) {
    this.count = count;
    this.receptorStride = receptorStride;
    this.position = new Float64Array(3 * count);
    this.heading = new Float64Array(3 * count);
    this.checkpoint = new Float64Array(3 * count);
    this.status = new Uint8Array(count);
    this.steps = new Uint32Array(count);
    this.pathLength = new Float64Array(count);
    this.population = new Uint16Array(count);
    this.sourceU = new Float64Array(count);
    this.sourceV = new Float64Array(count);
    this.knockin = new Uint8Array(count);
    this.receptorLevel = new Float64Array(count * receptorStride);
    this.adaptation = new Float64Array(count * receptorStride);
    this.rng = new Array<Uniform>(count);
  }
}

export interface SeedOptions {
  /** override every population's count (the `--axons` option), split in proportion */
  axons?: number;
  edits: Edit[];
  fieldIndex: Map<string, number>;
}

/** Compiles populations and seeds every axon on its source sheet. Axon i's source position
 *  and all its later random draws come from its own stream (seed, i). */
export function seedCones(scene: Scene, regions: Map<string, CompiledRegion>, opts: SeedOptions) {
  const counts = populationCounts(scene.populations, opts.axons);
  const total = counts.reduce((a, b) => a + b, 0);
  const stride = Math.max(1, ...scene.populations.map((p) => p.receptors.length));
  const cones = new ConeState(total, stride);
  const populations: ConePopulation[] = [];
  const p3 = new Float64Array(3);
  let first = 0;

  scene.populations.forEach((spec, index) => {
    const count = counts[index];
    const source = regions.get(spec.source) as Sheet;
    const startStep = Math.round(spec.start / scene.growth.dt);
    const pop: ConePopulation = {
      name: spec.name, index, first, count, spec, source,
      target: spec.target !== undefined ? regions.get(spec.target) : undefined,
      startStep,
      stepLength: spec.speed * scene.growth.dt,
      receptorNames: spec.receptors.map((r) => r.name),
      receptorField: Int32Array.from(spec.receptors.map((r) => opts.fieldIndex.get(r.binds)!)),
      receptorKd: Float64Array.from(spec.receptors.map((r) => r.kd)),
      receptorGain: Float64Array.from(spec.receptors.map((r) => (r.response === 'attract' ? 1 : -1) * r.weight)),
    };
    populations.push(pop);

    const dir = initialHeading(spec, source);
    for (let i = first; i < first + count; i++) {
      const rng = axonStream(scene.seed, i);
      cones.rng[i] = rng;
      const u = rng(), v = rng();
      cones.sourceU[i] = u;
      cones.sourceV[i] = v;
      cones.population[i] = index;
      source.point(u, v, 0.5, p3); // half a µm off the sheet, on its normal side
      cones.position.set(p3, 3 * i);
      cones.checkpoint.set(p3, 3 * i);
      cones.heading.set(dir, 3 * i);
      cones.status[i] = startStep > 0 ? WAITING : GROWING;
      spec.receptors.forEach((r, k) => {
        cones.receptorLevel[i * stride + k] = profileLevel(r.expression, u, v);
      });
    }
    applyKnockins(scene, pop, cones, opts.edits);
    first += count;
  });
  return { cones, populations };
}

/** knock-in: raise the named receptor by `delta` in a seeded random `fraction` of the axons,
 *  intermingled across the sheet (chosen uniformly, independent of position). */
function applyKnockins(scene: Scene, pop: ConePopulation, cones: ConeState, edits: Edit[]): void {
  edits.forEach((e, editIndex) => {
    if (e.op !== 'knockin') return;
    if (e.population !== undefined && e.population !== pop.name) return;
    const k = pop.receptorNames.indexOf(e.receptor);
    if (k < 0) return;
    const chosen = sampleIndices(stream(scene.seed, 'knockin', editIndex, pop.name), pop.count, Math.round(e.fraction * pop.count));
    for (const j of chosen) {
      const i = pop.first + j;
      cones.knockin[i] = 1;
      cones.receptorLevel[i * cones.receptorStride + k] = Math.max(0, cones.receptorLevel[i * cones.receptorStride + k] + e.delta);
    }
  });
}

function initialHeading(spec: Population, source: Sheet): Float64Array {
  const d = spec.direction ? Float64Array.from(spec.direction) : Float64Array.from(source.normal);
  const l = Math.hypot(d[0], d[1], d[2]);
  for (let a = 0; a < 3; a++) d[a] /= l;
  return d;
}

/** Scene counts, or `total` split across populations in proportion (each at least one). */
export function populationCounts(pops: Population[], total?: number): number[] {
  if (total === undefined) return pops.map((p) => p.count);
  const sum = pops.reduce((a, p) => a + p.count, 0);
  const counts = pops.map((p) => Math.max(1, Math.floor((p.count / sum) * total)));
  let rest = total - counts.reduce((a, b) => a + b, 0);
  for (let i = 0; rest > 0; i = (i + 1) % counts.length, rest--) counts[i]++;
  return counts;
}
