// The two stop rules against closed forms.
// Gradient balance (Gierer, Proc. R. Soc. B 218, 1983, from memory): a terminal settles where
// the forward signal's pull and the countergradient's balance, dE/du = 0; for matched
// exponentials at low occupancy that is target u = source u exactly. At higher occupancy the
// balance equation is solved here by bisection, written out independently of the engine.
// Stochastic energy updates (Koulakov & Tsigankov, BMC Neurosci. 5, 2004): Glauber acceptance
// with a symmetric proposal samples the Boltzmann density ∝ exp(−E/T) (Glauber, J. Math. Phys.
// 4, 1963), whose mean on [0, 1] is computed here by quadrature.
import { describe, it, expect } from 'vitest';
import { Scene } from '../../engine/scene/schema.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { STATUS_CODE } from '../../engine/io/runFormat.ts';

/** Target sheet 6 µm in front of the source with its u axis reversed, so every axon enters at
 *  target u = 1 − source u and must travel to its balance point. */
function balanceScene(kd: number, weight: number) {
  return Scene.parse({
    name: 'balance-check', seed: 5,
    volume: { size: [200, 400, 400], voxel: 20 },
    growth: { dt: 0.25, steps: 300, frameEvery: 50, wallWeight: 0 },
    regions: [
      { name: 'src', shape: 'sheet', origin: [20, 50, 50], uAxis: [0, 300, 0], vAxis: [0, 0, 300] },
      { name: 'dst', shape: 'sheet', origin: [26, 350, 50], uAxis: [0, -300, 0], vAxis: [0, 0, 300] },
    ],
    cues: [
      { name: 'fwdLigand', kind: 'expressed', region: 'dst', profile: { shape: 'exponential', axis: 'u', rate: 3 } },
      { name: 'revReceptor', kind: 'expressed', region: 'dst', profile: { shape: 'exponential', axis: 'u', reversed: true, rate: 3 } },
    ],
    populations: [{
      name: 'p', count: 150, source: 'src', target: 'dst', kappa: 50,
      sensing: { receptorCount: 1e12 },
      receptors: [
        { name: 'F', binds: 'fwdLigand', kd, response: 'repel', weight, expression: { shape: 'exponential', axis: 'u', reversed: true, rate: 3 } },
        { name: 'R', binds: 'revReceptor', kd, response: 'repel', weight, expression: { shape: 'exponential', axis: 'u', rate: 3 } },
      ],
      mapping: { rule: 'balance', signals: [{ receptor: 'F', mode: 'forward' }, { receptor: 'R', mode: 'reverse' }], settleSteps: 10, settleDistance: 1, maxHours: 60 },
    }],
  });
}

/** Root of dE/du for source s, with A_f = e^(−3s), A_r = e^(−3(1−s)), T_f = e^(−3(1−u)),
 *  T_r = e^(−3u): d/du [A_f T_f/(T_f + K) + T_r A_r/(A_r + K)] = 0. */
function balancePoint(s: number, K: number): number {
  const Af = Math.exp(-3 * s), Ar = Math.exp(-3 * (1 - s));
  const dE = (u: number) => {
    const Tf = Math.exp(-3 * (1 - u)), Tr = Math.exp(-3 * u);
    return (Af * K * 3 * Tf) / (Tf + K) ** 2 + (-3 * Tr * Ar) / (Ar + K);
  };
  let lo = 0, hi = 1;
  if (dE(lo) > 0) return 0;
  if (dE(hi) < 0) return 1;
  for (let k = 0; k < 60; k++) {
    const mid = (lo + hi) / 2;
    if (dE(mid) < 0) lo = mid; else hi = mid;
  }
  return (lo + hi) / 2;
}

async function terminals(scene: Scene) {
  const world = buildWorld(scene);
  await simulate(world);
  const rule = world.rules.find((r) => r.name === 'targeting')!;
  const cols = Object.fromEntries(rule.axonColumns!().map((c) => [c.name, c.values]));
  return { world, tu: cols.target_u as number[], tv: cols.target_v as number[] };
}

describe('gradient balance (Gierer 1983)', () => {
  it('matched exponentials at low occupancy: each terminal settles at target u = source u', async () => {
    const { world, tu } = await terminals(balanceScene(1000, 2e4));
    const { cones } = world;
    let worst = 0, sum = 0;
    for (let i = 0; i < cones.count; i++) {
      expect(cones.status[i]).toBe(STATUS_CODE.terminated);
      const d = Math.abs(tu[i] - cones.sourceU[i]);
      worst = Math.max(worst, d);
      sum += d;
    }
    expect(sum / cones.count).toBeLessThan(0.01);
    expect(worst).toBeLessThan(0.03);
  });
  it('at K_d = 0.5 (saturating forward occupancy) it settles on the root of the balance equation', async () => {
    const { world, tu } = await terminals(balanceScene(0.5, 5));
    const { cones } = world;
    let sum = 0, shifted = 0;
    for (let i = 0; i < cones.count; i++) {
      const target = balancePoint(cones.sourceU[i], 0.5);
      sum += Math.abs(tu[i] - target);
      shifted += Math.abs(target - cones.sourceU[i]);
    }
    expect(sum / cones.count).toBeLessThan(0.01);
    // the saturating case really differs from u = s, so this check is not the first one again
    expect(shifted / cones.count).toBeGreaterThan(0.05);
  });
});

describe('stochastic energy updates (Koulakov & Tsigankov 2004)', () => {
  it('lone terminals sample the Boltzmann density exp(−E/T) of their energy along the sheet', async () => {
    const kd = 1e4, weight = 300, T = 0.01;
    const scene = Scene.parse({
      name: 'boltzmann-check', seed: 9,
      volume: { size: [200, 200, 200], voxel: 20 },
      growth: { dt: 0.25, steps: 420, frameEvery: 100, wallWeight: 0 },
      regions: [
        { name: 'src', shape: 'sheet', origin: [20, 50, 50], uAxis: [0, 100, 0], vAxis: [0, 0, 100] },
        { name: 'dst', shape: 'sheet', origin: [26, 50, 50], uAxis: [0, 100, 0], vAxis: [0, 0, 100] },
      ],
      cues: [{ name: 'slope', kind: 'expressed', region: 'dst', profile: { shape: 'linear', axis: 'u' } }],
      populations: [{
        name: 'p', count: 400, source: 'src', target: 'dst', kappa: 50,
        sensing: { receptorCount: 1e12 }, // no sensing noise on the way in: every axon reaches the sheet
        receptors: [{ name: 'S', binds: 'slope', kd, response: 'repel', weight }],
        mapping: { rule: 'affinity', signals: [{ receptor: 'S' }], temperature: T, settleSteps: 200, maxHours: 100 },
      }],
    });
    const { world, tu, tv } = await terminals(scene);
    const mapped = tu.flatMap((u, i) => (typeof u === 'number' ? [i] : [])); // an axon may slip past the sheet's edge
    expect(mapped.length).toBeGreaterThan(0.95 * world.cones.count);
    const meanU = mapped.reduce((a, i) => a + tu[i], 0) / mapped.length, meanV = mapped.reduce((a, i) => a + tv[i], 0) / mapped.length;
    // E(u) = w·A·p(T(u)) = w·u/(u + K_d), A = 1; mean of u under exp(−E/T) by the midpoint rule
    let z = 0, m = 0;
    const N = 100_000;
    for (let k = 0; k < N; k++) {
      const u = (k + 0.5) / N, b = Math.exp(-(weight * u) / (u + kd) / T);
      z += b; m += u * b;
    }
    const expected = m / z; // ≈ 1/λ − 1/(e^λ − 1) with λ = w/(K_d T) = 3: 0.281
    expect(expected).toBeGreaterThan(0.27);
    expect(expected).toBeLessThan(0.29);
    expect(Math.abs(meanU - expected)).toBeLessThan(0.025);
    expect(Math.abs(meanV - 0.5)).toBeLessThan(0.03); // no signal along v: uniform
  });
});
