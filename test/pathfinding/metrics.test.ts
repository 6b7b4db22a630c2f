// Pathfinding metrics and the geometry they rest on, against references outside the module:
//  - nearest neighbours against brute force (fast-check), Pielou's index against its defining
//    properties (Pielou, J. Ecol. 49, 1961, from memory: 1 for complete segregation, 0 expected
//    for random labels);
//  - mean tortuosity of unguided walks against the freely rotating chain (Flory 1969, science
//    brief §3): by Jensen's inequality E[L/R] ≥ L/√⟨R²⟩, and close to it for stiff chains;
//  - reached/misrouted/stranded on a scene whose answer is set by geometry alone;
//  - tube distances against three.js's Line3 (a reference library from npm);
//  - domain regions on linear fields, where the first-order distance is exact;
//  - the lining field's gradient against central differences of its value.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import seedrandom from 'seedrandom';
import * as THREE from 'three';
import { neighbourTable, pielouIndex } from '../../engine/metrics/pathfinding.ts';
import { parseScene } from '../../engine/scene/load.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { Tube } from '../../engine/geometry/tube.ts';
import { Domain, type LevelField } from '../../engine/geometry/domains.ts';
import { walkScene } from '../helpers.ts';

function bruteTable(xyz: number[], labels: number[], owners: number[]) {
  const t = [[0, 0], [0, 0]];
  const n = labels.length;
  for (let i = 0; i < n; i++) {
    let best = -1, bd = Infinity;
    for (let j = 0; j < n; j++) {
      if (owners[j] === owners[i]) continue;
      const d = (xyz[3 * i] - xyz[3 * j]) ** 2 + (xyz[3 * i + 1] - xyz[3 * j + 1]) ** 2 + (xyz[3 * i + 2] - xyz[3 * j + 2]) ** 2;
      if (d < bd) { bd = d; best = j; }
    }
    if (best >= 0) t[labels[i]][labels[best]]++;
  }
  return t;
}

async function pathfinding(scene: unknown) {
  const world = buildWorld(parseScene(JSON.stringify(scene)));
  await simulate(world);
  const rule = world.rules.find((r) => r.name === 'pathfinding')!;
  return (rule.metrics!() as { pathfinding: any }).pathfinding;
}

describe('nearest-neighbour table', () => {
  it('matches brute force, the neighbour taken on another axon', () => {
    fc.assert(fc.property(
      fc.array(fc.tuple(fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 5, noNaN: true }), fc.integer({ min: 0, max: 6 })), { minLength: 2, maxLength: 80 }),
      (pts) => {
        const xyz = pts.flatMap((p) => [p[0], p[1], p[2]]);
        const owners = pts.map((p) => p[3]);
        const labels = owners.map((o) => o % 2);
        expect(neighbourTable(Float64Array.from(xyz), labels, owners, pts.length)).toEqual(bruteTable(xyz, labels, owners));
      },
    ), { numRuns: 60, seed: 7 });
  });
});

describe('Pielou segregation index', () => {
  it('is 1 when every nearest neighbour is of the same population', () => {
    expect(pielouIndex([[40, 0], [0, 25]])).toBe(1);
  });
  it('averages ≈ 0 over random labellings of a fixed point set', () => {
    const rng = seedrandom('pielou');
    const n = 400;
    const xyz = Float64Array.from({ length: 3 * n }, () => 100 * rng());
    const owners = Int32Array.from({ length: n }, (_, i) => i);
    let sum = 0;
    const trials = 60;
    for (let t = 0; t < trials; t++) {
      const labels = Uint8Array.from({ length: n }, () => (rng() < 0.4 ? 0 : 1));
      sum += pielouIndex(neighbourTable(xyz, labels, owners, n))!;
    }
    expect(Math.abs(sum / trials)).toBeLessThan(0.03);
  });
  it('is ≈ 1 for two separated clouds and null when one population is empty', () => {
    const rng = seedrandom('clouds');
    const n = 200;
    const xyz = new Float64Array(3 * n), labels = new Uint8Array(n), owners = Int32Array.from({ length: n }, (_, i) => i);
    for (let i = 0; i < n; i++) {
      labels[i] = i < n / 2 ? 0 : 1;
      for (let a = 0; a < 3; a++) xyz[3 * i + a] = 10 * rng() + (labels[i] ? 50 : 0);
    }
    expect(pielouIndex(neighbourTable(xyz, labels, owners, n))).toBe(1);
    expect(pielouIndex([[10, 0], [0, 0]])).toBeNull();
  });
});

describe('tortuosity of unguided walks', () => {
  it('sits just above the freely rotating chain bound L/√⟨R²⟩', async () => {
    const n = 50, kappa = 300;
    const m = 1 / Math.tanh(kappa) - 1 / kappa; // mean cosine of a vMF step (Fisher 1953)
    const R2 = n * (1 + m) / (1 - m) - (2 * m * (1 - m ** n)) / (1 - m) ** 2; // in units of ℓ², Flory 1969
    const bound = n / Math.sqrt(R2);
    const pf = await pathfinding(walkScene({ count: 600, steps: n, kappa }));
    expect(pf.meanTortuosity).toBeGreaterThan(bound - 0.003); // sampling noise ≈ 0.001
    expect(pf.meanTortuosity).toBeLessThan(bound + 0.01);
    expect(pf.reachedTargetFraction).toBeNull(); // no target: no fractions
  });
});

describe('reached, misrouted, stranded', () => {
  it('straight axons split between a target and a plain nucleus in proportion to the sheet each faces', async () => {
    // The sheet spans y ∈ [100, 300]; the target faces y ∈ [100, 175] (3/8), a plain nucleus
    // y ∈ [175, 300] (5/8) at the far wall; a cue-making box is ground, not a destination.
    const scene = {
      name: 'split', seed: 3, volume: { size: [400, 400, 100], voxel: 20 },
      growth: { steps: 60, wallWeight: 0, stallSteps: 1000 },
      regions: [
        { name: 'src', shape: 'sheet', origin: [20, 100, 40], uAxis: [0, 200, 0], vAxis: [0, 0, 20] },
        { name: 'goal', shape: 'box', min: [300, 100, 0], max: [400, 175, 100] },
        { name: 'other', shape: 'box', min: [300, 175, 0], max: [400, 300, 100] },
        { name: 'maker', shape: 'box', min: [0, 0, 0], max: [400, 100, 100] },
      ],
      cues: [{ name: 'c', kind: 'region', region: 'maker', diffusion: 10, decay: 0.1, rate: 0.001 }],
      populations: [{ name: 'p', count: 800, source: 'src', target: 'goal', kappa: 1e5, speed: 40 }],
    };
    const pf = await pathfinding(scene);
    const se = Math.sqrt((3 / 8) * (5 / 8) / 800); // binomial s.e. of the seeded share
    expect(Math.abs(pf.reachedTargetFraction - 3 / 8)).toBeLessThan(4 * se);
    expect(Math.abs(pf.misroutedFraction - 5 / 8)).toBeLessThan(4 * se);
    expect(pf.reachedTargetFraction + pf.misroutedFraction + pf.strandedFraction).toBeCloseTo(1, 12);
    expect(pf.populations.p.destinations).toEqual(['other']);
    expect(pf.meanTortuosity).toBeCloseTo(1, 2); // exits clamp the last step's end onto the wall
  });
});

describe('tube geometry', () => {
  it('distance to the wall is the distance to the axis segment minus the radius (three.js Line3)', () => {
    const rng = seedrandom('tube');
    for (let t = 0; t < 50; t++) {
      const from: [number, number, number] = [100 * rng(), 100 * rng(), 100 * rng()];
      const to: [number, number, number] = [100 * rng(), 100 * rng(), 100 * rng()];
      const radius = 1 + 20 * rng();
      const tube = new Tube({ name: 't', shape: 'tube', permissive: true, from, to, radius });
      const line = new THREE.Line3(new THREE.Vector3(...from), new THREE.Vector3(...to));
      const n = new Float64Array(3);
      for (let k = 0; k < 20; k++) {
        const p = new THREE.Vector3(150 * rng() - 25, 150 * rng() - 25, 150 * rng() - 25);
        const q = line.closestPointToPoint(p, true, new THREE.Vector3());
        const want = p.distanceTo(q) - radius;
        expect(tube.distance(p.x, p.y, p.z, n)).toBeCloseTo(want, 9);
        expect(tube.contains(p.x, p.y, p.z)).toBe(want <= 0);
        const dir = p.clone().sub(q).normalize();
        expect(n[0] * dir.x + n[1] * dir.y + n[2] * dir.z).toBeCloseTo(1, 9);
      }
    }
  });
});

describe('domain regions', () => {
  // a rises along x, b falls: b − a is linear, so φ/|∇φ| is the exact distance to x = 300
  const a: LevelField = { sample: (x, _y, _z, g) => { g[0] = 0.01; g[1] = 0; g[2] = 0; return 0.01 * x; } };
  const b: LevelField = { sample: (x, _y, _z, g) => { g[0] = -0.01; g[1] = 0; g[2] = 0; return 0.01 * (600 - x); } };
  it('"dominant" is the side where the species exceeds the other, with exact distance and normal', () => {
    const d = new Domain({ name: 'd', shape: 'domain', permissive: true, species: 'a', dominant: true });
    expect(() => d.contains(1, 1, 1)).toThrow(/before its border cue was solved/);
    d.bind(a, b, null);
    const n = new Float64Array(3);
    for (const x of [0, 120, 299, 301, 480, 600]) {
      expect(d.contains(x, 5, 5)).toBe(x > 300);
      expect(d.distance(x, 5, 5, n)).toBeCloseTo(300 - x, 9);
      expect(n[0]).toBeCloseTo(-1, 12); // outward: toward smaller x
    }
  });
  it('thresholds and `within` intersect', () => {
    const box = { name: 'w', shape: 'box', permissive: true, contains: (x: number) => x <= 500, distance: (x: number, _y: number, _z: number, n: Float64Array) => { n[0] = 1; n[1] = n[2] = 0; return x - 500; } } as const;
    const d = new Domain({ name: 'd', shape: 'domain', permissive: true, species: 'a', above: 2, below: 4, within: 'w' });
    d.bind(a, b, box as never);
    const n = new Float64Array(3);
    expect([150, 250, 350, 450, 550].map((x) => d.contains(x, 0, 0))).toEqual([false, true, true, false, false]);
    expect(d.distance(150, 0, 0, n)).toBeCloseTo(50, 9); // below the "above" level by 0.5 = 50 µm
    expect(d.distance(300, 0, 0, n)).toBeCloseTo(-100, 9);
    expect(d.distance(560, 0, 0, n)).toBeCloseTo(160, 9); // the "below" level at 400 is the farthest
  });
});

describe('lining field', () => {
  it('its gradient is the derivative of its value, inside the tube and over the rim', () => {
    const scene = {
      name: 'lin', seed: 1, volume: { size: [300, 100, 100], voxel: 10 },
      regions: [{ name: 'via', shape: 'tube', from: [20, 50, 50], to: [280, 60, 50], radius: 15 }],
      cues: [{ name: 'v', kind: 'lining', region: 'via', profile: { shape: 'exponential', amplitude: 2, rate: 3 }, contact: 10 }],
    };
    const world = buildWorld(parseScene(JSON.stringify(scene)));
    const f = world.fields[0];
    const rng = seedrandom('lining');
    const g = new Float64Array(3), tmp = new Float64Array(3);
    const e = 1e-4;
    let checked = 0;
    while (checked < 200) {
      const x = 30 + 240 * rng(), y = 25 + 60 * rng(), z = 25 + 50 * rng();
      const v = f.sample(x, y, z, g);
      if (v === 0) continue;
      const fd = [
        (f.sample(x + e, y, z, tmp) - f.sample(x - e, y, z, tmp)) / (2 * e),
        (f.sample(x, y + e, z, tmp) - f.sample(x, y - e, z, tmp)) / (2 * e),
        (f.sample(x, y, z + e, tmp) - f.sample(x, y, z - e, tmp)) / (2 * e),
      ];
      for (let a = 0; a < 3; a++) expect(g[a]).toBeCloseTo(fd[a], 5);
      checked++;
    }
    // level at the `to` end is the profile's amplitude; beyond the contact distance it is 0
    expect(f.sample(280, 60, 50, g)).toBeCloseTo(2, 9);
    expect(f.sample(150, 55 + 15 + 10.5, 50, g)).toBe(0);
  });
});
