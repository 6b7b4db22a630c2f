// With no cues a growth cone's heading is a chain of von Mises–Fisher steps, so its statistics
// have closed forms: mean cosine between successive headings m = coth κ − 1/κ
// (Fisher, Proc. R. Soc. A 217, 1953) and the end-to-end mean squared distance of a freely
// rotating chain ⟨R²ₙ⟩ = nℓ²(1+m)/(1−m) − 2ℓ²m(1−mⁿ)/(1−m)² (Flory, Statistical Mechanics of
// Chain Molecules, 1969). Checked within 4 standard errors over many axons.
import { describe, it, expect } from 'vitest';
import { Scene } from '../../engine/scene/schema.ts';
import { buildWorld, simulate } from '../../engine/sim/simulate.ts';
import { walkScene } from '../helpers.ts';

async function walk(kappa: number, steps: number, count: number) {
  const scene = Scene.parse(walkScene({ kappa, steps, count }));
  const world = buildWorld(scene);
  const frames: Float32Array[] = [];
  await simulate(world, { onFrame: (_f, _s, p) => frames.push(p.slice()) });
  return { frames, step: 40 * 0.25 };
}

function meanAndSe(xs: number[]) {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  const v = xs.reduce((a, b) => a + (b - m) ** 2, 0) / (xs.length - 1);
  return { mean: m, se: Math.sqrt(v / xs.length) };
}

describe('no-cue walk', () => {
  for (const kappa of [4, 20]) {
    it(`κ = ${kappa}: successive heading cosine is coth κ − 1/κ`, async () => {
      const { frames } = await walk(kappa, 30, 1500);
      const m = 1 / Math.tanh(kappa) - 1 / kappa;
      const cosines: number[] = [];
      const n = frames[0].length / 3;
      for (let a = 0; a < n; a++) {
        // one cosine per axon (mean over its steps) keeps samples independent
        let s = 0, k = 0;
        for (let f = 2; f < frames.length; f++) {
          const u = [0, 1, 2].map((i) => frames[f - 1][3 * a + i] - frames[f - 2][3 * a + i]);
          const v = [0, 1, 2].map((i) => frames[f][3 * a + i] - frames[f - 1][3 * a + i]);
          s += (u[0] * v[0] + u[1] * v[1] + u[2] * v[2]) / (Math.hypot(...u) * Math.hypot(...v));
          k++;
        }
        cosines.push(s / k);
      }
      const { mean, se } = meanAndSe(cosines);
      expect(Math.abs(mean - m)).toBeLessThan(4 * se + 1e-4);
    });
  }

  it('κ = 10: end-to-end MSD follows the freely rotating chain', async () => {
    const kappa = 10, n = 40;
    const { frames, step } = await walk(kappa, n, 3000);
    const m = 1 / Math.tanh(kappa) - 1 / kappa;
    const flory = n * step * step * (1 + m) / (1 - m) - (2 * step * step * m * (1 - m ** n)) / (1 - m) ** 2;
    const first = frames[0], last = frames[frames.length - 1];
    const r2: number[] = [];
    for (let a = 0; a < first.length / 3; a++) {
      r2.push((last[3 * a] - first[3 * a]) ** 2 + (last[3 * a + 1] - first[3 * a + 1]) ** 2 + (last[3 * a + 2] - first[3 * a + 2]) ** 2);
    }
    const { mean, se } = meanAndSe(r2);
    expect(Math.abs(mean - flory)).toBeLessThan(4 * se);
    // and not the straight-line or free-walk extremes
    expect(mean).toBeLessThan(0.9 * (n * step) ** 2);
    expect(mean).toBeGreaterThan(2 * n * step * step);
  });
});
