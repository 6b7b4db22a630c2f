// scenes/bundles.json, run in-process: pioneers cross the volume, followers bundle onto them.
// What is checked is the behaviour the trade expects of fasciculation (followers grow along
// pioneer axons and end where they end; no bundling between classes that do not adhere; axons
// leave a bundle where a guidance cue pulls them off it: common practice, no source), measured
// partly by the run's own metrics and partly by an independent oracle written here on three.js
// Line3 (npm reference library) over the stored frames. The incremental shaft index is checked
// against a brute-force index rebuilt from scratch out of the frames.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Line3, Vector3 } from 'three';
import { afterAll, describe, expect, it } from 'vitest';
import { Scene } from '../../engine/scene/schema.ts';
import { parseScene } from '../../engine/scene/load.ts';
import { resolveScene } from '../../engine/scene/edits.ts';
import { buildWorld, simulate, type World } from '../../engine/sim/simulate.ts';
import { type FasciculationRule, HOT_INDEX, makeFasciculationRule } from '../../engine/agents/fasciculation.ts';
import type { FasciculationMetrics } from '../../engine/metrics/fasciculation.ts';
import { fasciculationMetrics } from '../../engine/metrics/fasciculation.ts';
import { createShaftIndex } from '../../engine/index/shaftIndex.ts';
import { STATUS_CODE } from '../../engine/io/runFormat.ts';
import { ROOT, cli, tempDir } from '../helpers.ts';

const TEXT = readFileSync(join(ROOT, 'scenes/bundles.json'), 'utf8');
const RAW = JSON.parse(TEXT);

interface Run {
  world: World;
  rule: FasciculationRule;
  m: FasciculationMetrics & { releasedSteps: number };
  /** positions per stored frame, [frame][3·axon] */
  frames: Float32Array[];
}

async function run(raw: unknown, variant?: string, frameEvery?: number, axons?: number): Promise<Run> {
  const scene = parseScene(JSON.stringify(raw), 'bundles.json');
  if (frameEvery) scene.growth.frameEvery = frameEvery;
  const resolved = resolveScene(scene, variant);
  const world = buildWorld(resolved.scene, { edits: resolved.edits, axons });
  const frames: Float32Array[] = [];
  await simulate(world, { onFrame: (_f, _s, pos) => frames.push(pos.slice()) });
  const rule = world.rules.find((r) => r.name === 'fasciculation') as FasciculationRule;
  const m = rule.metrics().fasciculation as Run['m'];
  return { world, rule, m, frames };
}

const pop = (w: World, name: string) => w.populations.find((p) => p.name === name)!;

/** Mean over followers of the distance from its end point to the nearest pioneer end point. */
function endToPioneers(w: World): number {
  const P = pop(w, 'pioneers'), F = pop(w, 'followers'), x = w.cones.position;
  let sum = 0;
  for (let i = F.first; i < F.first + F.count; i++) {
    let best = Infinity;
    for (let j = P.first; j < P.first + P.count; j++) {
      best = Math.min(best, Math.hypot(x[3 * i] - x[3 * j], x[3 * i + 1] - x[3 * j + 1], x[3 * i + 2] - x[3 * j + 2]));
    }
    sum += best;
  }
  return sum / F.count;
}

/** Oracle: share of follower path points (stored frames, after they start) within r of a
 *  pioneer's path, the pioneer paths taken as polylines through the same frames. */
function nearPioneers(r: Run, radius: number): number {
  const P = pop(r.world, 'pioneers'), F = pop(r.world, 'followers');
  const line = new Line3(), q = new Vector3(), c = new Vector3();
  const at = (f: number, i: number) => new Vector3(r.frames[f][3 * i], r.frames[f][3 * i + 1], r.frames[f][3 * i + 2]);
  let near = 0, total = 0;
  for (let i = F.first; i < F.first + F.count; i++) {
    for (let f = 1; f < r.frames.length; f++) {
      q.copy(at(f, i));
      if (q.distanceTo(at(f - 1, i)) === 0) continue; // not started or stopped
      total++;
      let hit = false;
      for (let j = P.first; j < P.first + P.count && !hit; j++) {
        for (let g = 1; g < r.frames.length && !hit; g++) {
          line.start.copy(at(g - 1, j));
          line.end.copy(at(g, j));
          if (line.closestPointToPoint(q, true, c).distanceTo(q) <= radius) hit = true;
        }
      }
      if (hit) near++;
    }
  }
  return near / total;
}

describe('bundles.json: followers bundle onto pioneers', async () => {
  const withAdhesion = await run(RAW);
  const without = await run(RAW, 'no-adhesion');
  const rF = RAW.populations[1].adhesion.radius;

  it('the scene starts the pioneers first (6 h head start)', () => {
    expect(pop(withAdhesion.world, 'pioneers').startStep).toBe(0);
    expect(pop(withAdhesion.world, 'followers').startStep).toBe(24); // 6 h / 0.25 h per step
  });

  it('fasciculatedFraction is much larger with adhesion than without', () => {
    const a = withAdhesion.m, b = without.m;
    expect(a.fasciculatedFraction).toBeGreaterThan(3 * b.fasciculatedFraction);
    expect(a.populations!.followers.fasciculatedFraction).toBeGreaterThan(0.7);
    expect(b.populations!.followers.fasciculatedFraction).toBeLessThan(0.2);
    expect(a.bundleCount).toBeGreaterThan(0);
    expect(a.bundledAxonFraction).toBeGreaterThan(3 * b.bundledAxonFraction + 0.1);
  });

  it('the independent oracle agrees: followers’ paths run near pioneers’ paths only with adhesion', () => {
    const a = nearPioneers(withAdhesion, rF), b = nearPioneers(without, rF);
    expect(a).toBeGreaterThan(0.6);
    expect(a).toBeGreaterThan(4 * b);
  });

  it('followers end nearer the pioneers’ end points with adhesion', () => {
    const a = endToPioneers(withAdhesion.world), b = endToPioneers(without.world);
    expect(a).toBeLessThan(0.4 * b);
    const F = pop(withAdhesion.world, 'followers');
    let reached = 0;
    for (let i = F.first; i < F.first + F.count; i++) if (withAdhesion.world.cones.status[i] === STATUS_CODE.reached) reached++;
    expect(reached / F.count).toBeGreaterThan(0.6); // blind to the beacon, they reach it on the pioneers' shafts
  });

  it('the incremental index holds every shaft: metrics equal a brute-force index rebuilt from the frames', async () => {
    const r = await run(RAW, undefined, 1, 40); // 8 pioneers, 32 followers
    const n = r.world.cones.count, brute = createShaftIndex('brute', { axons: n, maxPointsPerAxon: 8 });
    const store = brute.shafts;
    for (let i = 0; i < n; i++) {
      for (let f = 0; f < r.frames.length; f++) {
        const x = r.frames[f][3 * i], y = r.frames[f][3 * i + 1], z = r.frames[f][3 * i + 2];
        if (!store.isLastPoint(i, x, y, z)) brute.append(i, x, y, z);
      }
    }
    const w = r.world, cls = (i: number) => w.populations[w.cones.population[i]].spec.adhesion!;
    const ref = fasciculationMetrics({
      shafts: store, index: brute, radius: Array.from({ length: n }, (_, i) => cls(i).radius),
      adheres: (a, b) => cls(a).adheresTo.includes(cls(b).class),
    });
    expect(r.rule.index.segmentCount).toBe(brute.segmentCount);
    // frames are float32, the engine's shafts float64: equal up to that rounding
    expect(Math.abs(r.m.fasciculatedFraction - ref.fasciculatedFraction)).toBeLessThan(2e-3);
    expect(Math.abs(r.m.shaftLengthUm - ref.shaftLengthUm) / ref.shaftLengthUm).toBeLessThan(1e-5);
    expect(r.m.bundleCount).toBe(ref.bundleCount);
  });

  it('paths are the same, bit for bit, with each step’s searches made ahead or cone by cone', async () => {
    // The rule finds every cone's nearest shaft at the start of a step, the searches sorted
    // by cell and bounded by a neighbour's answer; it must answer as it does asking each
    // cone's question as the cone steers. Same index both ways: the indexes agree on
    // distances (test/index/shaftIndex.test.ts, against brute force and three.js Line3) but
    // may pick different segments where two tie, and paths then part.
    const paths = async (findAhead: boolean) => {
      const scene = parseScene(TEXT, 'bundles.json');
      const world = buildWorld(scene, { axons: 60 });
      const rule = makeFasciculationRule(world, HOT_INDEX, { findAhead })!;
      world.rules = [...world.rules.filter((r) => r.name !== 'fasciculation'), rule];
      const frames: Float32Array[] = [];
      await simulate(world, { onFrame: (_f, _s, pos) => frames.push(pos.slice()) });
      return { frames, end: world.cones.position.slice(), attached: (rule.metrics().fasciculation as { attachedSteps: number }).attachedSteps };
    };
    const ahead = await paths(true), plain = await paths(false);
    expect(ahead.attached).toBeGreaterThan(0);
    expect(ahead.attached).toBe(plain.attached);
    expect(ahead.frames.length).toBe(plain.frames.length);
    ahead.frames.forEach((f, k) => expect(f).toEqual(plain.frames[k]));
    expect(ahead.end).toEqual(plain.end);
  });
});

describe('adhesion between incompatible classes only', async () => {
  // Pioneers and followers adhere only to class "decoy": one short axon in a far corner.
  const raw = structuredClone(RAW);
  raw.regions.push({ name: 'corner', shape: 'sheet', origin: [1150, 20, 20], uAxis: [30, 0, 0], vAxis: [0, 30, 0] });
  raw.populations.push({
    name: 'decoys', count: 1, source: 'corner', direction: [0, 0, 1], kappa: 40, speed: 1, // a short stub in the corner
    adhesion: { class: 'decoy', adheresTo: ['decoy'], radius: 20 },
  });
  raw.populations[0].adhesion.adheresTo = ['decoy'];
  raw.populations[1].adhesion.adheresTo = ['decoy'];
  const incompatible = await run(raw);
  const without = await run(RAW, 'no-adhesion');
  const withAdhesion = await run(RAW);

  it('gives no bundling', () => {
    // only chance passes by the lone decoy count (no link reaches the 25 % share of a bundle)
    expect(incompatible.m.fasciculatedFraction).toBeLessThan(0.05);
    expect(incompatible.m.fasciculatedFraction).toBeLessThan(0.1 * withAdhesion.m.fasciculatedFraction);
    expect(incompatible.m.bundleCount).toBe(0);
    expect(incompatible.m.meanBundleSize).toBe(0);
  });

  it('followers disperse as without adhesion (oracle and end points)', () => {
    const rF = RAW.populations[1].adhesion.radius;
    const inc = nearPioneers(incompatible, rF), none = nearPioneers(without, rF), adh = nearPioneers(withAdhesion, rF);
    expect(inc).toBeLessThan(0.25 * adh);
    expect(Math.abs(inc - none)).toBeLessThan(0.1);
    expect(endToPioneers(incompatible.world)).toBeGreaterThan(2.5 * endToPioneers(withAdhesion.world));
  });
});

describe('defasciculation: a side cue pulls followers off the bundle', async () => {
  // Followers gain a receptor for a lure 300 µm to the side of the pioneers' route. With the
  // default release factor θ = 1 the lure's pull across the bundle outweighs adhesion near it and
  // followers leave; with θ = 10⁶ the bundle holds them and they stay on the pioneers' route.
  const LURE: [number, number, number] = [650, 100, 300];
  const variant = (theta: number) => {
    const raw = structuredClone(RAW);
    raw.cues.push({ name: 'lure', kind: 'point', position: LURE, diffusion: 60, decay: 0.0005, rate: 3000 });
    const f = raw.populations[1];
    f.receptors = [{ name: 'LureR', binds: 'lure', kd: 0.05, response: 'attract', weight: 5 }];
    f.adhesion.release = theta;
    return raw;
  };
  const leave = await run(variant(1));
  const hold = await run(variant(1e6));

  const summary = (r: Run) => {
    const F = pop(r.world, 'followers'), x = r.world.cones.position;
    const released = r.rule.axonColumns().find((c) => c.name === 'released_steps')!.values;
    let d = 0, reached = 0, rel = 0;
    for (let i = F.first; i < F.first + F.count; i++) {
      d += Math.hypot(x[3 * i] - LURE[0], x[3 * i + 1] - LURE[1], x[3 * i + 2] - LURE[2]);
      if (r.world.cones.status[i] === STATUS_CODE.reached) reached++;
      rel += Number(released[i]);
    }
    return { lure: d / F.count, reached: reached / F.count, released: rel, fraction: r.m.populations!.followers.fasciculatedFraction };
  };

  it('with θ = 1 followers let go and end near the lure; with θ = 10⁶ they stay bundled', () => {
    const a = summary(leave), b = summary(hold);
    expect(a.released).toBeGreaterThan(0);
    expect(b.released).toBe(0);
    expect(a.lure).toBeLessThan(0.7 * b.lure);
    expect(b.reached).toBeGreaterThan(a.reached + 0.25);
    expect(b.fraction).toBeGreaterThan(a.fraction + 0.2);
  });
});

describe('bundles.json is a valid scene', () => {
  it('parses with the schema, and the no-adhesion variant sets every adhesion weight to 0', () => {
    const s = Scene.parse(RAW);
    expect(s.populations.every((p) => p.adhesion)).toBe(true);
    const r = resolveScene(s, 'no-adhesion');
    expect(r.scene.populations.map((p) => p.adhesion!.weight)).toEqual([0, 0]);
    expect(s.populations.map((p) => p.adhesion!.weight)).not.toEqual([0, 0]); // the scene itself is untouched
  });
});

describe('the run store', () => {
  const tmp = tempDir();
  afterAll(() => tmp.cleanup());

  it('run.json carries metrics.fasciculation; axons.csv the per-axon adhesion steps', () => {
    const out = join(tmp.dir, 'b');
    const r = cli(['run', join(ROOT, 'scenes/bundles.json'), '--axons', '20', '--steps', '120', '--out', out, '--quiet']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const m = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8')).metrics.fasciculation;
    for (const k of ['fasciculatedFraction', 'bundleCount', 'meanBundleSize']) expect(typeof m[k]).toBe('number');
    expect(m.fasciculatedFraction).toBeGreaterThan(0);
    expect(m.fasciculatedFraction).toBeLessThanOrEqual(1);
    expect(Object.keys(m.populations)).toEqual(['pioneers', 'followers']);
    const header = readFileSync(join(out, 'axons.csv'), 'utf8').split('\n')[0].split(',');
    expect(header).toEqual(expect.arrayContaining(['fasciculated_steps', 'released_steps']));
  });
});
