// Walls are hard constraints: a growth cone may be pushed back near a non-permissive region but
// may never be inside one (common practice, no source); and the filopodial sensing mode turns
// cones up a gradient, more reliably the steeper it is (science brief §2, filopodial sampling).
import { describe, it, expect } from 'vitest';
import { Scene } from '../../engine/scene/schema.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { sensedGradientFilopodia } from '../../engine/agents/sensing.ts';
import { stream } from '../../engine/agents/random.ts';

describe('walls', () => {
  it('no recorded position is ever inside a wall, and axons get past it', async () => {
    const scene = Scene.parse({
      name: 'wall', seed: 3, volume: { size: [600, 300, 300], voxel: 20 },
      growth: { dt: 0.25, steps: 150, frameEvery: 1 },
      regions: [
        { name: 'src', shape: 'sheet', origin: [20, 100, 100], uAxis: [0, 100, 0], vAxis: [0, 0, 100] },
        { name: 'dst', shape: 'sheet', origin: [560, 0, 0], uAxis: [0, 300, 0], vAxis: [0, 0, 300] },
        { name: 'block', shape: 'box', min: [250, 60, 60], max: [300, 240, 240], permissive: false },
      ],
      cues: [{ name: 'lure', kind: 'point', position: [580, 150, 150], diffusion: 50, decay: 0.0002, rate: 1e6 }],
      populations: [{
        name: 'p', count: 200, source: 'src', target: 'dst', kappa: 20, persistence: 1.5,
        sensing: { receptorCount: 400000, saturation: 0.005 },
        receptors: [{ name: 'R', binds: 'lure', kd: 0.3, response: 'attract', weight: 1.5 }],
      }],
    });
    const world = buildWorld(scene);
    let inside = 0;
    await simulate(world, {
      onFrame: (_f, _s, p) => {
        for (let i = 0; i < p.length; i += 3) {
          if (p[i] > 250 && p[i] < 300 && p[i + 1] > 60 && p[i + 1] < 240 && p[i + 2] > 60 && p[i + 2] < 240) inside++;
        }
      },
    });
    expect(inside).toBe(0);
    let reached = 0;
    for (let i = 0; i < world.cones.count; i++) if (world.cones.status[i] === 1) reached++;
    expect(reached / world.cones.count).toBeGreaterThan(0.5);
  });
});

describe('filopodial sensing', () => {
  it('points up the gradient on average, more so for a steeper gradient', () => {
    const rng = stream(9, 'filopodia-test');
    const tips = new Float64Array(4 * 16), out = new Float64Array(3);
    const bias = (slope: number) => {
      // linear field c = 1 + slope·x around x = 0, K_d = 1
      const at = (x: number) => Math.max(0, 1 + slope * x);
      let s = 0;
      for (let t = 0; t < 3000; t++) {
        sensedGradientFilopodia(at, 0, 0, 0, 0, 1, 0, 1, 20000, 8, 15, 0.01, rng, tips, out, 0);
        s += out[0];
      }
      return s / 3000;
    };
    const flat = bias(0), shallow = bias(0.001), steep = bias(0.01);
    expect(Math.abs(flat)).toBeLessThan(0.05);
    expect(shallow).toBeGreaterThan(0.05);
    expect(steep).toBeGreaterThan(shallow);
  });
});
