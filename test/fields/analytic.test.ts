// Analytic cue kinds against their closed forms, written out here independently of the engine.
import { describe, it, expect } from 'vitest';
import { buildFields } from '../../engine/fields/index.ts';
import { compileRegions } from '../../engine/geometry/regions.ts';
import { Scene } from '../../engine/scene/schema.ts';
import { ONE_SOURCE } from '../helpers.ts';

function fieldsOf(sceneJson: unknown) {
  const scene = Scene.parse(sceneJson);
  for (const c of scene.cues) if (c.kind === 'point') c.radius ??= scene.volume.voxel;
  return buildFields(scene, compileRegions(scene.regions)).fields;
}

describe('point source (analytic)', () => {
  // Steady state of D∇²c − kc + Qδ: c = Q/(4πDr)·exp(−r/λ), λ = √(D/k)
  // (Crank, The Mathematics of Diffusion, 2nd ed. 1975, point source with first-order loss).
  const Q = 2, D = 50, k = 0.0005, lambda = Math.sqrt(D / k);
  const crank = (r: number) => (Q / (4 * Math.PI * D * r)) * Math.exp(-r / lambda);
  const field = fieldsOf(ONE_SOURCE).get('attractant-1')!;
  const g = new Float64Array(3);

  it('matches Q/(4πDr)e^(−r/λ) to 1e-9 relative', () => {
    for (const [x, y, z] of [[300, 300, 400], [310, 290, 305], [10, 20, 590], [599, 300, 1], [450, 150, 300]]) {
      const r = Math.hypot(x - 300, y - 300, z - 300);
      const c = field.sample(x, y, z, g);
      expect(Math.abs(c - crank(r)) / crank(r)).toBeLessThan(1e-9);
    }
  });

  it('gradient equals the analytic derivative −c(1/r + 1/λ)·r̂ to 1e-9 relative', () => {
    const [x, y, z] = [380, 250, 330];
    const dx = x - 300, dy = y - 300, dz = z - 300, r = Math.hypot(dx, dy, dz);
    const dcdr = -crank(r) * (1 / r + 1 / lambda);
    field.sample(x, y, z, g);
    const want = [dcdr * dx / r, dcdr * dy / r, dcdr * dz / r];
    for (let a = 0; a < 3; a++) expect(Math.abs(g[a] - want[a]) / Math.abs(dcdr)).toBeLessThan(1e-9);
  });

  it('is held at c(radius) inside the source radius (default one voxel = 10 µm)', () => {
    expect(field.sample(300, 300, 300, g)).toBeCloseTo(crank(10), 12);
    expect(field.sample(303, 300, 300, g)).toBeCloseTo(crank(10), 12);
    expect([...g]).toEqual([0, 0, 0]);
  });

  it('several sources add up (linearity of the steady equation)', () => {
    const two = structuredClone(ONE_SOURCE) as any;
    two.cues[0].extraSources = [{ position: [100, 100, 100], rate: 1 }];
    const f2 = fieldsOf(two).get('attractant-1')!;
    const p = [200, 220, 180];
    const r1 = Math.hypot(p[0] - 300, p[1] - 300, p[2] - 300), r2 = Math.hypot(p[0] - 100, p[1] - 100, p[2] - 100);
    const want = crank(r1) + (1 / 2) * crank(r2);
    expect(Math.abs(f2.sample(p[0], p[1], p[2], g) - want) / want).toBeLessThan(1e-9);
  });

  it('scale multiplies the field and a knockout (scale 0) removes it', () => {
    const s = structuredClone(ONE_SOURCE) as any;
    s.cues[0].scale = 0.5;
    expect(fieldsOf(s).get('attractant-1')!.sample(300, 300, 400, g)).toBeCloseTo(0.5 * crank(100), 14);
    s.cues[0].scale = 0;
    expect(fieldsOf(s).get('attractant-1')!.sample(300, 300, 400, g)).toBe(0);
  });
});

describe('relay gradient', () => {
  // Each cell makes a fraction α of its upstream neighbour: c_n = c₀αⁿ (geometric series).
  const c0 = 5, alpha = 0.8, h = 12;
  const scene = {
    name: 'relay', seed: 1, volume: { size: [400, 200, 200], voxel: 10 },
    regions: [
      { name: 'chain', shape: 'box', min: [20, 90, 90], max: [380, 110, 110] },
      { name: 'leaf', shape: 'sheet', origin: [20, 20, 100], uAxis: [360, 0, 0], vAxis: [0, 160, 0] },
    ],
    cues: [
      { name: 'relayed', kind: 'relay', region: 'chain', axis: 'x', first: c0, alpha, cellSpacing: h },
      { name: 'relayed-sheet', kind: 'relay', region: 'leaf', axis: 'u', reversed: true, first: c0, alpha, cellSpacing: h },
    ],
  };
  const fields = fieldsOf(scene);
  const g = new Float64Array(3);

  it('cell n (centre at (n + ½)h from the first face) has c₀αⁿ', () => {
    const f = fields.get('relayed')!;
    for (const n of [0, 1, 2, 5, 10, 20]) {
      const x = 20 + (n + 0.5) * h;
      expect(f.sample(x, 100, 100, g) / (c0 * alpha ** n)).toBeCloseTo(1, 10);
    }
  });
  it('decays with length h/|ln α| and is zero out of contact', () => {
    const f = fields.get('relayed')!;
    const ell = h / Math.abs(Math.log(alpha));
    const a = f.sample(100, 100, 100, g), b = f.sample(100 + ell, 100, 100, g);
    expect(b / a).toBeCloseTo(Math.exp(-1), 10);
    expect(g[0]).toBeCloseTo(-b / ell, 10);
    expect(f.sample(100, 180, 100, g)).toBe(0);
  });
  it('on a sheet, reversed runs from the u = 1 edge', () => {
    const f = fields.get('relayed-sheet')!;
    // u = 1 edge is x = 380; cell 3 centre is 3.5h in from it
    expect(f.sample(380 - 3.5 * h, 100, 101, g) / (c0 * alpha ** 3)).toBeCloseTo(1, 10);
    expect(g[0]).toBeGreaterThan(0); // rising toward the first cell
  });
});

describe('expressed ligand on a sheet', () => {
  const scene = {
    name: 'expr', seed: 1, volume: { size: [400, 400, 200], voxel: 10 },
    regions: [{ name: 'plate', shape: 'sheet', origin: [100, 100, 100], uAxis: [200, 0, 0], vAxis: [0, 100, 0] }],
    cues: [{ name: 'lig', kind: 'expressed', region: 'plate', contact: 5, profile: { shape: 'exponential', axis: 'u', amplitude: 2, offset: 0.1, rate: 3 } }],
  };
  const f = fieldsOf(scene).get('lig')!;
  const g = new Float64Array(3);
  it('follows offset + A·exp(−r(1 − u)) with its in-sheet derivative, on contact only', () => {
    const u = 0.3, x = 100 + 200 * u;
    const want = 0.1 + 2 * Math.exp(-3 * (1 - u));
    expect(f.sample(x, 150, 102, g)).toBeCloseTo(want, 12);
    // dℓ/dx = dℓ/du · du/dx = A·r·exp(−r(1−u)) / 200
    expect(g[0]).toBeCloseTo((2 * 3 * Math.exp(-3 * (1 - u))) / 200, 12);
    expect(g[1]).toBeCloseTo(0, 12);
    expect(f.sample(x, 150, 110, g)).toBe(0); // beyond contact
    expect(f.sample(320, 150, 100, g)).toBe(0); // beyond the sheet's edge
  });
});
