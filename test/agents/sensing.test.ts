// Receptor sensing against the occupancy theory it implements.
import { describe, it, expect } from 'vitest';
import { occupancy, occupancySensitivity, sensedGradientOccupancy, adaptLevel } from '../../engine/agents/sensing.ts';
import { stream } from '../../engine/agents/random.ts';

describe('receptor occupancy', () => {
  it('p(c) = c/(c + K_d): half bound at K_d (law of mass action)', () => {
    expect(occupancy(2, 2)).toBe(0.5);
    expect(occupancy(0, 1)).toBe(0);
    expect(occupancy(9, 1)).toBeCloseTo(0.9, 15);
  });

  it('sensitivity c·dp/dc peaks at c = K_d (Goodhill & Urbach, J. Neurobiol. 41, 1999)', () => {
    const kd = 0.7;
    // c·dp/dc by central difference of p, independent of the engine's closed form
    const numeric = (c: number) => (c * (occupancy(c * 1.0001, kd) - occupancy(c * 0.9999, kd))) / (c * 0.0002);
    let best = 0, bestC = 0;
    for (let e = -3; e <= 3; e += 0.01) {
      const c = kd * 10 ** e;
      expect(occupancySensitivity(c, kd)).toBeCloseTo(numeric(c), 6);
      if (numeric(c) > best) { best = numeric(c); bestC = c; }
    }
    expect(bestC / kd).toBeCloseTo(1, 1);
    expect(best).toBeCloseTo(0.25, 6); // Kd·Kd/(2Kd)² = 1/4
  });

  it('gradient detection by binomial occupancy noise is best near K_d and fails when saturated or dilute', () => {
    // Fixed 2 % concentration change across a 10 µm cone, gradient along +x; accuracy is the mean
    // projection of the sensed direction on the true one. Theory: signal ∝ p(1−p), noise ∝ √(p(1−p)),
    // so the signal-to-noise ratio ∝ √(p(1−p)) peaks at p = ½, i.e. c = K_d (Goodhill & Urbach 1999).
    const kd = 1, a = 10, rel = 0.02, N = 2000;
    const rng = stream(5, 'sensing-test');
    const out = new Float64Array(3);
    const accuracy = (c: number) => {
      let s = 0;
      for (let t = 0; t < 4000; t++) {
        sensedGradientOccupancy(c, (rel * c) / a, 0, 0, kd, N, a, 1e9, rng, out, 0);
        const m = Math.hypot(out[0], out[1], out[2]);
        s += m > 0 ? out[0] / m : 0;
      }
      return s / 4000;
    };
    const cs = [0.001, 0.01, 0.1, 1, 10, 100, 1000];
    const acc = cs.map(accuracy);
    const peak = acc.indexOf(Math.max(...acc));
    expect(cs[peak]).toBe(1);
    expect(acc[0]).toBeLessThan(acc[3] / 2);
    expect(acc[6]).toBeLessThan(acc[3] / 2);
  });

  it('adaptation relaxes exactly as dm/dt = (c − m)/τ', () => {
    // solution m(t) = c + (m₀ − c)e^(−t/τ) of the linear ODE
    expect(adaptLevel(0, 5, 1)).toBeCloseTo(5 * (1 - Math.exp(-1)), 14);
    let m = 0;
    for (let i = 0; i < 10; i++) m = adaptLevel(m, 5, 0.1);
    expect(m).toBeCloseTo(5 * (1 - Math.exp(-1)), 12);
  });
});
