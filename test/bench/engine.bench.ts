// Engine throughput: cone-steps per second for a 10,000-axon scene with three cues (an analytic
// point attractant, a grid-solved region repellent, an expressed contact ligand), against a
// minimal hand-written kernel doing the same field sampling and steering maths in one flat loop.
// Run: npx tsx test/bench/engine.bench.ts [--json]
import { Scene } from '../../engine/scene/schema.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { GridSampler } from '../../engine/fields/gridSampler.ts';
import { SolvedField } from '../../engine/fields/solvedField.ts';

const AXONS = 10_000, STEPS = 60, REPEATS = 5;

export const benchScene = {
  name: 'bench-three-cues', seed: 99,
  volume: { size: [1000, 600, 600], voxel: 10 },
  growth: { dt: 0.25, steps: STEPS, frameEvery: 5, stallSteps: 1000 },
  regions: [
    { name: 'src', shape: 'sheet', origin: [20, 100, 100], uAxis: [0, 400, 0], vAxis: [0, 0, 400] },
    { name: 'dst', shape: 'sheet', origin: [980, 0, 0], uAxis: [0, 600, 0], vAxis: [0, 0, 600] },
    { name: 'post', shape: 'box', min: [400, 250, 250], max: [460, 350, 350] },
    { name: 'floor', shape: 'sheet', origin: [0, 0, 50], uAxis: [1000, 0, 0], vAxis: [0, 600, 0] },
  ],
  cues: [
    { name: 'lure', kind: 'point', position: [950, 300, 300], diffusion: 50, decay: 0.0002, rate: 1e6 },
    { name: 'spike', kind: 'region', region: 'post', diffusion: 20, decay: 0.05, rate: 0.5 },
    { name: 'carpet', kind: 'expressed', region: 'floor', contact: 1000, profile: { shape: 'linear', axis: 'u', amplitude: 2 } },
  ],
  populations: [{
    name: 'p', count: AXONS, source: 'src', target: 'dst', persistence: 1.5, kappa: 25,
    sensing: { receptorCount: 400000, saturation: 0.005 },
    receptors: [
      { name: 'A', binds: 'lure', kd: 0.3, response: 'attract', weight: 1.5 },
      { name: 'B', binds: 'spike', kd: 0.5, response: 'repel', weight: 1.5 },
      { name: 'C', binds: 'carpet', kd: 1, response: 'attract', weight: 0.3 },
    ],
  }],
};

export async function engineBench() {
  const scene = Scene.parse(benchScene);
  const engineRates: number[] = [];
  const kernelRates: number[] = [];
  let world = buildWorld(scene);
  const solved = world.fields[1] as SolvedField;
  for (let r = 0; r < REPEATS; r++) {
    world = buildWorld(scene);
    const t0 = performance.now();
    await simulate(world);
    const dt = (performance.now() - t0) / 1000;
    let coneSteps = 0;
    for (let i = 0; i < world.cones.count; i++) coneSteps += world.cones.steps[i];
    engineRates.push(coneSteps / dt);
    kernelRates.push(minimalKernel(world.cones.position.slice(), solved, STEPS));
  }
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const coneStepsPerSec = median(engineRates);
  const kernelConeStepsPerSec = median(kernelRates);
  return {
    coneStepsPerSec,
    kernelConeStepsPerSec,
    engineOverKernel: coneStepsPerSec / kernelConeStepsPerSec,
    enginePeakRssMiB: process.resourceUsage().maxRSS / 1024,
    engineBench: { axons: AXONS, steps: STEPS, repeats: REPEATS, cues: 3 },
  };
}

/** The same per-step work, hand-inlined: three field samples (analytic point with gradient,
 *  trilinear grid with gradient, linear contact ligand), occupancy with normal-approximated
 *  binomial noise on three axes per receptor, persistence, vMF turn, step. A flat loop with
 *  Math.random standing in for the per-axon streams. Returns cone-steps per second. */
function minimalKernel(pos: Float64Array, spike: SolvedField, steps: number): number {
  const n = pos.length / 3;
  const dir = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) dir[3 * i] = 1;
  const grid = new GridSampler({ nx: 101, ny: 61, nz: 61, h: 10 }, spike.values);
  const g = new Float64Array(3);
  const kds = [0.3, 0.5, 1], gains = [1.5, -1.5, 0.3];
  const gauss = () => Math.sqrt(-2 * Math.log(1 - Math.random())) * Math.cos(2 * Math.PI * Math.random());
  const t0 = performance.now();
  for (let s = 0; s < steps; s++) {
    for (let i = 0; i < n; i++) {
      const x = pos[3 * i], y = pos[3 * i + 1], z = pos[3 * i + 2];
      let hx = 1.5 * dir[3 * i], hy = 1.5 * dir[3 * i + 1], hz = 1.5 * dir[3 * i + 2];
      for (let r = 0; r < 3; r++) {
        let c: number;
        if (r === 0) {
          const dx = x - 950, dy = y - 300, dz = z - 300, d = Math.sqrt(dx * dx + dy * dy + dz * dz) || 1;
          c = (1e6 / (4 * Math.PI * 50 * d)) * Math.exp(-d * 0.002);
          const k = (-c * (1 / d + 0.002)) / d;
          g[0] = k * dx; g[1] = k * dy; g[2] = k * dz;
        } else if (r === 1) c = grid.sample(x, y, z, g);
        else { c = (2 * x) / 1000; g[0] = 2 / 1000; g[1] = 0; g[2] = 0; }
        let ex = 0, ey = 0, ez = 0;
        for (let a = 0; a < 3; a++) {
          const pp = (c + g[a] * 5) / (c + g[a] * 5 + kds[r]), pm = (c - g[a] * 5) / (c - g[a] * 5 + kds[r]);
          const d = pp - pm + Math.sqrt((pp * (1 - pp) + pm * (1 - pm)) / 200000) * gauss();
          if (a === 0) ex = d; else if (a === 1) ey = d; else ez = d;
        }
        const m = Math.sqrt(ex * ex + ey * ey + ez * ez), k = gains[r] / Math.max(m, 0.005);
        hx += k * ex; hy += k * ey; hz += k * ez;
      }
      const hl = Math.sqrt(hx * hx + hy * hy + hz * hz);
      hx /= hl; hy /= hl; hz /= hl;
      const u = Math.random(), w = 1 + Math.log(u + (1 - u) * Math.exp(-50)) / 25, phi = 2 * Math.PI * Math.random();
      const sq = Math.sqrt(1 - w * w);
      let ax = 0, ay = -hz, az = hy;
      if (Math.abs(hx) >= 0.9) { ax = hz; ay = 0; az = -hx; }
      const al = Math.sqrt(ax * ax + ay * ay + az * az);
      ax /= al; ay /= al; az /= al;
      const bx = hy * az - hz * ay, by = hz * ax - hx * az, bz = hx * ay - hy * ax;
      const nx = w * hx + sq * (Math.cos(phi) * ax + Math.sin(phi) * bx);
      const ny = w * hy + sq * (Math.cos(phi) * ay + Math.sin(phi) * by);
      const nz = w * hz + sq * (Math.cos(phi) * az + Math.sin(phi) * bz);
      dir[3 * i] = nx; dir[3 * i + 1] = ny; dir[3 * i + 2] = nz;
      pos[3 * i] = Math.min(999, Math.max(1, x + 10 * nx));
      pos[3 * i + 1] = Math.min(599, Math.max(1, y + 10 * ny));
      pos[3 * i + 2] = Math.min(599, Math.max(1, z + 10 * nz));
    }
  }
  return (n * steps) / ((performance.now() - t0) / 1000);
}

if (process.argv[1]?.endsWith('engine.bench.ts')) {
  const r = await engineBench();
  if (process.argv.includes('--json')) process.stdout.write(JSON.stringify(r) + '\n');
  else {
    console.log(`engine: ${(r.coneStepsPerSec / 1e6).toFixed(2)} M cone-steps/s (median of ${REPEATS}, ${AXONS} axons × ${STEPS} steps, 3 cues)`);
    console.log(`minimal kernel: ${(r.kernelConeStepsPerSec / 1e6).toFixed(2)} M cone-steps/s; engine/kernel = ${(100 * r.engineOverKernel).toFixed(0)} %`);
    console.log(`peak RSS: ${r.enginePeakRssMiB.toFixed(0)} MiB`);
  }
}
