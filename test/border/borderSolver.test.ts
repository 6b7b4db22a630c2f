// The coupled border solve (engine/fields/borderSolver.ts) against things outside it:
//  - a plain explicit (forward Euler, method of lines) integration of the same two equations
//    to steady state on a four-times finer grid, written out here independently (common
//    practice, no source);
//  - mirror symmetry: with mirror-image parameters the border lies exactly midway (symmetry);
//  - lowering one species' production moves the border toward that species' source, raising
//    it moves the border away, monotonically (science brief §1: common practice, no source).
import { describe, it, expect } from 'vitest';
import { solveBorder, hillRepression, type BorderSolution } from '../../engine/fields/borderSolver.ts';

interface Case { L: number; D: number; k: number; rate: [number, number]; K: number; n: number; pole: number }

/** smooth production step at each end, so both grids resolve the same source (no O(h) jump) */
function production(c: Case, h: number, s: 0 | 1): Float64Array {
  const N = Math.round(c.L / h) + 1;
  const out = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    const x = s === 0 ? i * h : c.L - i * h;
    out[i] = c.rate[s] / (1 + Math.exp((x - c.pole) / 15));
  }
  return out;
}

function solve1D(c: Case, h: number, tolerance = 1e-9): BorderSolution {
  const N = Math.round(c.L / h) + 1;
  const sp = (s: 0 | 1) => ({ diffusion: c.D, decay: c.k, production: production(c, h, s), repression: c.K, hill: c.n });
  return solveBorder({ grid: { nx: N, ny: 1, nz: 1, h }, boundary: 'reflecting', tolerance, species: [sp(0), sp(1)] });
}

/** forward Euler from a = b = 0 with mirror (zero-flux) ends, dt = 0.4·h²/(2D), until time T */
function explicitReference(c: Case, h: number, T: number) {
  const N = Math.round(c.L / h) + 1;
  const sa = production(c, h, 0), sb = production(c, h, 1);
  let a = new Float64Array(N), b = new Float64Array(N), a2 = new Float64Array(N), b2 = new Float64Array(N);
  const dt = (0.4 * h * h) / (2 * c.D), q = c.D / (h * h);
  let rate = 0;
  for (let t = 0; t < T; t += dt) {
    rate = 0;
    for (let i = 0; i < N; i++) {
      const l = i > 0 ? i - 1 : 1, r = i < N - 1 ? i + 1 : N - 2;
      // ∂a/∂t = D a'' − k a + s_a / (1 + (b/K)^n), and the mirror for b
      const da = q * (a[l] + a[r] - 2 * a[i]) - c.k * a[i] + sa[i] / (1 + (b[i] / c.K) ** c.n);
      const db = q * (b[l] + b[r] - 2 * b[i]) - c.k * b[i] + sb[i] / (1 + (a[i] / c.K) ** c.n);
      a2[i] = a[i] + dt * da;
      b2[i] = b[i] + dt * db;
      rate = Math.max(rate, Math.abs(da), Math.abs(db));
    }
    [a, a2] = [a2, a];
    [b, b2] = [b2, b];
  }
  return { a, b, rate };
}

/** x where a − b changes sign from + to −, by linear interpolation; NaN if it does not */
function borderOf(a: ArrayLike<number>, b: ArrayLike<number>, h: number): number {
  for (let i = 0; i < a.length - 1; i++) {
    const d0 = a[i] - b[i], d1 = a[i + 1] - b[i + 1];
    if (d0 >= 0 && d1 < 0) return h * (i + d0 / (d0 - d1));
  }
  return NaN;
}

function maxRelDiff(s: BorderSolution, ref: { a: Float64Array; b: Float64Array }, stride: number): number {
  let e = 0, m = 0;
  for (let i = 0; i < s.a.length; i++) {
    e = Math.max(e, Math.abs(s.a[i] - ref.a[i * stride]), Math.abs(s.b[i] - ref.b[i * stride]));
    m = Math.max(m, ref.a[i * stride], ref.b[i * stride]);
  }
  return e / m;
}

// λ = √(D/k) = 100 µm over a 600 µm field; repression strong enough to matter (K ≈ levels at the border).
const BASE: Case = { L: 600, D: 50, k: 0.005, rate: [0.05, 0.05], K: 0.1, n: 2, pole: 60 };

describe('Hill-type repression', () => {
  it('halves production at the half level K and falls as 1/(1 + (y/K)^n)', () => {
    expect(hillRepression(0.3, 0.3, 2)).toBeCloseTo(0.5, 15);
    expect(hillRepression(0.6, 0.3, 2)).toBeCloseTo(1 / 5, 15);
    expect(hillRepression(0, 0.3, 4)).toBe(1);
  });
});

describe('border solve, one dimension', () => {
  it('matches a finely resolved explicit integration of the same equations, converging with h', () => {
    const c: Case = { ...BASE, rate: [0.1, 0.05] }; // unequal, so the border is off centre
    const ref = explicitReference(c, 2.5, 8000);
    expect(ref.rate).toBeLessThan(1e-7); // the reference has reached steady state
    const xRef = borderOf(ref.a, ref.b, 2.5);
    expect(xRef).toBeGreaterThan(320);
    const coarse = solve1D(c, 10), fine = solve1D(c, 5);
    for (const s of [coarse, fine]) {
      expect(s.converged).toBe(true);
      expect(s.unique).toBe(true);
      expect(s.method).toBe('bracket');
    }
    const eCoarse = Math.abs(borderOf(coarse.a, coarse.b, 10) - xRef);
    const eFine = Math.abs(borderOf(fine.a, fine.b, 5) - xRef);
    // measured: 0.05 µm at h = 10 and 0.01 µm at h = 5 (second order in h)
    expect(eCoarse).toBeLessThan(0.25);
    expect(eFine).toBeLessThan(0.06);
    expect(eFine).toBeLessThan(eCoarse);
    // profiles: measured 8.9e-4 and 1.8e-4 of the peak level
    const pCoarse = maxRelDiff(coarse, ref, 4), pFine = maxRelDiff(fine, ref, 2);
    expect(pCoarse).toBeLessThan(3e-3);
    expect(pFine).toBeLessThan(pCoarse / 2.5);
  });

  it('with mirror-image parameters the border lies midway', () => {
    const s = solve1D(BASE, 10);
    expect(s.converged).toBe(true);
    expect(borderOf(s.a, s.b, 10)).toBeCloseTo(300, 5);
    // and the two profiles are mirror images node by node
    const N = s.a.length;
    let e = 0;
    for (let i = 0; i < N; i++) e = Math.max(e, Math.abs(s.a[i] - s.b[N - 1 - i]));
    expect(e).toBeLessThan(1e-8);
  });

  it('scaling one species moves the border toward its source when lowered, away when raised, monotonically', () => {
    const factors = [0.25, 0.5, 0.8, 1, 1.25, 2, 4];
    const xs = factors.map((f) => {
      const s = solve1D({ ...BASE, rate: [BASE.rate[0] * f, BASE.rate[1]] }, 10);
      expect(s.converged).toBe(true);
      return borderOf(s.a, s.b, 10);
    });
    for (let i = 1; i < xs.length; i++) expect(xs[i]).toBeGreaterThan(xs[i - 1]);
    expect(xs[factors.indexOf(1)]).toBeCloseTo(300, 5);
    expect(xs[0]).toBeLessThan(250); // a's source is at x = 0
    expect(xs[xs.length - 1]).toBeGreaterThan(400);
  });

  it('every steady state lies in the bracket: the answer is within the reported gap of the reference', () => {
    const c: Case = { ...BASE, rate: [0.05, 0.08] };
    const s = solve1D(c, 5, 1e-4); // a loose tolerance, so the bound is what is tested
    const ref = explicitReference(c, 5, 8000);
    expect(ref.rate).toBeLessThan(1e-7);
    // same grid: only the bracket and the reference's own convergence separate them
    expect(maxRelDiff(s, ref, 1)).toBeLessThanOrEqual(s.gap / 2 + 1e-6);
  });

  it('when the system is bistable it reports so and follows the time course from zero, like the explicit integration', () => {
    // λ ≈ 316 µm, longer than the field: the species that starts ahead takes the whole field, and
    // either one could, so the two monotone chains end apart.
    const c: Case = { L: 600, D: 100, k: 0.001, rate: [0.02, 0.01], K: 0.1, n: 2, pole: 60 };
    const s = solve1D(c, 10);
    expect(s.unique).toBe(false);
    expect(s.method).toBe('evolved');
    expect(s.converged).toBe(true);
    const ref = explicitReference(c, 5, 20000);
    expect(ref.rate).toBeLessThan(1e-9);
    expect(maxRelDiff(s, ref, 2)).toBeLessThan(5e-3); // measured 4.9e-4 against an h = 2.5 reference
  });
});

describe('border solve, three dimensions', () => {
  it('a slab along x gives the same border as the 1D solve, with no variation across it', () => {
    const h = 10, N = 61, M = 5;
    const line = solve1D(BASE, h);
    const prod = (s: 0 | 1) => {
      const p1 = production(BASE, h, s), out = new Float64Array(N * M * M);
      for (let k = 0; k < M; k++) for (let j = 0; j < M; j++) for (let i = 0; i < N; i++) out[i + N * (j + M * k)] = p1[i];
      return out;
    };
    const sp = (s: 0 | 1) => ({ diffusion: BASE.D, decay: BASE.k, production: prod(s), repression: BASE.K, hill: BASE.n });
    const slab = solveBorder({ grid: { nx: N, ny: M, nz: M, h }, boundary: 'reflecting', tolerance: 1e-9, species: [sp(0), sp(1)] });
    let e = 0;
    for (let k = 0; k < M; k++) for (let j = 0; j < M; j++) for (let i = 0; i < N; i++) {
      e = Math.max(e, Math.abs(slab.a[i + N * (j + M * k)] - line.a[i]));
    }
    expect(e).toBeLessThan(1e-6 * Math.max(...line.a));
  });
});
