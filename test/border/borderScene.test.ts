// scenes/border.json end to end: probe shows where the border is and where it moves under
// --variant and --perturb before any axon is simulated; axons that target one side follow the
// border when it moves; the run store exports the species and the border surface.
// Facts checked: the scene is mirror-symmetric, so the border lies midway (symmetry); lowering
// rostrin moves the border toward rostrin's source, raising it moves it away (science brief §1:
// common practice, no source); a growth cone stops on entering its target (the engine's rule),
// so axons targeting the far territory end just past the border.
import { describe, it, expect, afterAll, beforeAll } from 'vitest';
import { readFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { cli, tempDir, ROOT } from '../helpers.ts';
import { loadScene } from '../../engine/scene/load.ts';
import { resolveScene } from '../../engine/scene/edits.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { AXON_STATUS } from '../../engine/io/runFormat.ts';

const SCENE = join(ROOT, 'scenes/border.json');
const tmp = tempDir();
afterAll(() => tmp.cleanup());

/** probe a cue along the field's long axis (y = 100, z = 50) from x = 150 to 450 µm */
function probeLine(cue: string, extra: string[] = []): { x: number; value: number }[] {
  const at = [];
  for (let x = 150; x <= 450; x += 10) at.push('--at', `${x},100,50`);
  const r = cli(['probe', SCENE, '--cue', cue, ...at, ...extra]);
  expect(r.stderr).toBe('');
  expect(r.code).toBe(0);
  return r.stdout.trim().split('\n').map((l) => {
    const o = JSON.parse(l);
    return { x: o.at[0], value: o.value };
  });
}

/** zero crossing of a sampled a − b, linear between samples */
function crossing(samples: { x: number; value: number }[]): number {
  for (let i = 0; i < samples.length - 1; i++) {
    const p = samples[i], q = samples[i + 1];
    if (p.value >= 0 && q.value < 0) return p.x + (p.value / (p.value - q.value)) * (q.x - p.x);
  }
  return NaN;
}

describe('probe shows the border before any axon grows', () => {
  let normal: { x: number; value: number }[] = [];
  let low: { x: number; value: number }[] = [];
  beforeAll(() => {
    normal = probeLine('limes');
    low = probeLine('limes', ['--variant', 'rostrin-low']);
  });
  it('the difference field is zero midway in the mirror-symmetric scene', () => {
    expect(crossing(normal)).toBeCloseTo(300, 1);
  });
  it('--variant moves it toward rostrin’s source when rostrin is lowered and away when raised', () => {
    const high = crossing(probeLine('limes', ['--variant', 'rostrin-high']));
    expect(crossing(low)).toBeLessThan(290);
    expect(high).toBeGreaterThan(310);
  });
  it('--perturb with a scale edit on a species gives exactly what the variant gives', () => {
    expect(probeLine('limes', ['--perturb', '{"op":"scale","cue":"rostrin","factor":0.5}'])).toEqual(low);
  });
  it('each species is a cue probe can sample, and their difference is the border cue', () => {
    const a = probeLine('rostrin');
    const { scene } = resolveScene(loadScene(SCENE));
    const world = buildWorld({ ...scene, populations: [] });
    const caudin = world.fields[world.fieldIndex.get('caudin')!];
    const g = new Float64Array(3);
    a.forEach((s, i) => {
      expect(s.value).toBeGreaterThan(0);
      expect(s.value - caudin.sample(s.x, 100, 50, g)).toBeCloseTo(normal[i].value, 12);
    });
  });
});

describe('axons targeting one side follow the border', () => {
  const base = loadScene(SCENE);
  for (const variant of [undefined, 'rostrin-low', 'rostrin-high']) {
    it(`${variant ?? 'normal'}: the caudal axons stop just rostral of the border, the rostral ones just caudal of it`, async () => {
      const { scene, edits } = resolveScene(base, variant);
      const world = buildWorld(scene, { edits, axons: 120 });
      await simulate(world);
      const limes = world.fields[world.fieldIndex.get('limes')!];
      const g = new Float64Array(3);
      let xb = NaN;
      for (let x = 100; x < 500; x++) {
        const p = limes.sample(x, 100, 50, g), q = limes.sample(x + 1, 100, 50, g);
        if (p >= 0 && q < 0) xb = x + p / (p - q);
      }
      const step = scene.populations[0].speed * scene.growth.dt;
      for (const pop of world.populations) {
        let sum = 0;
        for (let i = pop.first; i < pop.first + pop.count; i++) {
          expect(AXON_STATUS[world.cones.status[i]]).toBe('reached');
          sum += world.cones.position[3 * i];
        }
        const meanX = sum / pop.count;
        // a cone stops on the first step that ends inside its target: within one step past the border
        if (pop.name === 'caudal-axons') {
          expect(meanX).toBeLessThan(xb);
          expect(meanX).toBeGreaterThan(xb - step);
        } else {
          expect(meanX).toBeGreaterThan(xb);
          expect(meanX).toBeLessThan(xb + step);
        }
      }
    });
  }
});

describe('the run store exports the species and the border surface', () => {
  it('fields/<species>.npy for each species, fields/limes.npy = a − b marked as a border, pathfinding metrics', () => {
    const out = join(tmp.dir, 'run');
    const r = cli(['run', SCENE, '--axons', '40', '--steps', '40', '--out', out, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const m = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    const byName = Object.fromEntries(m.fields.map((f: { cue: string }) => [f.cue, f]));
    expect(Object.keys(byName).sort()).toEqual(['caudin', 'limes', 'rostrin']);
    for (const f of m.fields) expect(existsSync(join(out, f.file))).toBe(true);
    expect(byName.limes.border.species).toEqual(['rostrin', 'caudin']);
    expect(byName.limes.border.solve.converged).toBe(true);
    expect(byName.limes.min).toBeLessThan(0);
    expect(byName.limes.max).toBeGreaterThan(0);
    expect(m.metrics.pathfinding.populations['caudal-axons'].reachedTargetFraction).toBeTypeOf('number');
  });
});
