/**
 * Steady state of two mutually repressing morphogens on the volume grid:
 *
 *     D_a ∇²a − k_a a + s_a(x) · r_a(b) = 0,    r_a(b) = 1 / (1 + (b / K_a)^n_a)
 *     D_b ∇²b − k_b b + s_b(x) · r_b(a) = 0,    r_b(a) = 1 / (1 + (a / K_b)^n_b)
 *
 * Each species is made where its source density s is non-zero, at a rate cut by a Hill-type
 * repression by the other species (K: the other's level that halves production; n: the Hill
 * coefficient). This is the steady state of ∂a/∂t = D_a∇²a − k_a a + s_a/(1 + (b/K_a)^n_a) and
 * its mirror (the border model of the science brief, §1; Hill-type repression is common
 * practice, no source).
 *
 * Method: two monotone Gauss–Seidel chains of linear solves.
 * For a fixed partner, each equation is linear: a = A(b) solves D∇²a − ka + s r(b) = 0 with the
 * grid solver (gridSolver.ts). The 7-point operator kI − D∇²_h is an M-matrix, so its inverse
 * is non-negative (discrete maximum principle) and, because r is decreasing, A is
 * order-reversing: b ≤ b' ⇒ A(b) ≥ A(b'). Two chains start from the two unrepressed extremes:
 *
 *     high-a chain:  a₀ = A(0),  b₁ = B(a₀),  a₁ = A(b₁),  b₂ = B(a₁), …   (a falls, b rises)
 *     high-b chain:  b₀ = B(0),  a₁ = A(b₀),  b₁ = B(a₁),  a₂ = A(b₁), …   (a rises, b falls)
 *
 * By induction every steady state (a*, b*) is bracketed: a_low ≤ a* ≤ a_high and
 * b_low ≤ b* ≤ b_high at every iteration (the monotone iteration of sub- and super-solutions
 * for quasi-monotone systems; Pao, Nonlinear Parabolic and Elliptic Equations, 1992, from
 * memory). Both chains move monotonically, so no damping (relaxation) is needed and none can
 * oscillate. The stopping test is the bracket width itself:
 *
 *     gap = max( ‖a_high − a_low‖∞ / ‖a_high‖∞ , ‖b_high − b_low‖∞ / ‖b_high‖∞ ) ≤ tolerance
 *
 * and the answer is the midpoint, within gap/2 (relative) of every steady state, so the
 * tolerance is an error bound, not a guess. Each chain step contracts the error by about μ²,
 * where μ is the loop gain of the repression at the border; measured iteration counts are in
 * test/border/. When the chains each stop moving but the bracket stays open, the system has
 * more than one steady state (bistable: the border depends on history). The bracket's midpoint
 * is then no steady state at all, so the solver falls back to following the time course from
 * a = b = 0 (both morphogens switched on together), by semi-implicit Euler steps
 *
 *     (a' − a)/Δt = D_a∇²a' − k_a a' + s_a r_a(b),   and the mirror for b,
 *
 * each one linear solve with decay k + 1/Δt (unconditionally stable in the diffusion term),
 * Δt growing geometrically to a cap of 2/k_min. At the cap one step maps an error mode e to
 * about (½ ± μ)/(3/2)·e, which contracts at any stable steady state (μ < 1), so the steps settle
 * on the stable state this history leads to; they stop when the relative change per step is
 * below tolerance/10. The result then reports unique = false and method = "evolved".
 *
 * Each linear solve starts from the previous iterate of the same chain (warm start) and runs
 * to a relative residual well below the outer tolerance, so solver error does not blur the
 * bracket.
 */
import { solveSteadyReactionDiffusion, type Boundary, type GridSpec } from './gridSolver.ts';

export interface BorderSpeciesProblem {
  /** D, µm²/s */
  diffusion: number;
  /** k, 1/s */
  decay: number;
  /** s(x) per node: unrepressed production density, concentration/s (scale already applied) */
  production: Float64Array;
  /** K: the other species' level at which this species' production is halved */
  repression: number;
  /** n: Hill coefficient of the repression */
  hill: number;
}

export interface BorderProblem {
  grid: GridSpec;
  boundary: Boundary;
  species: [BorderSpeciesProblem, BorderSpeciesProblem];
  /** relative bracket width at which to stop (default 1e-6) */
  tolerance?: number;
  /** chain steps (each: two linear solves per chain) before giving up (default 500) */
  maxIterations?: number;
  onProgress?: (iteration: number, gap: number) => void;
}

export interface BorderSolution {
  /** midpoint of the bracket, per node */
  a: Float64Array;
  b: Float64Array;
  /** chain steps taken */
  iterations: number;
  /** CG iterations summed over every linear solve */
  linearIterations: number;
  /** final relative bracket width (see the module comment) */
  gap: number;
  /** gap ≤ tolerance */
  converged: boolean;
  /** false when the chains stopped moving with the bracket still open: several steady states */
  unique: boolean;
  /** "bracket": midpoint of the converged bracket; "evolved": time course from zero (not unique) */
  method: 'bracket' | 'evolved';
}

/** Hill-type repression factor r(y) = 1 / (1 + (y/K)^n), for y ≥ 0. */
export function hillRepression(y: number, K: number, n: number): number {
  if (!(y > 0)) return 1;
  return 1 / (1 + Math.pow(y / K, n));
}

export function solveBorder(p: BorderProblem): BorderSolution {
  const { grid, boundary } = p;
  const [A, B] = p.species;
  const n = grid.nx * grid.ny * grid.nz;
  if (A.production.length !== n || B.production.length !== n) throw new RangeError(`production needs ${n} values per species`);
  const tol = p.tolerance ?? 1e-6;
  const maxIter = p.maxIterations ?? 500;
  // Linear solves well below the bracket tolerance, so their error does not blur it.
  const linTol = Math.min(1e-9, tol * 1e-3);
  let linearIterations = 0;

  const src = new Float64Array(n);
  /** one linear solve: the species `self` under repression by `other` (null: unrepressed) */
  const solve = (self: BorderSpeciesProblem, other: Float64Array | null, initial: Float64Array | undefined): Float64Array => {
    const s = self.production, K = self.repression, h = self.hill;
    for (let i = 0; i < n; i++) src[i] = s[i] === 0 ? 0 : other ? s[i] * hillRepression(other[i], K, h) : s[i];
    const sol = solveSteadyReactionDiffusion({
      grid, diffusion: self.diffusion, decay: self.decay, source: src, boundary, tolerance: linTol, initial,
    });
    linearIterations += sol.iterations;
    return sol.c;
  };

  // high-a chain starts from a = A(0); high-b chain from b = B(0).
  let aHi = solve(A, null, undefined);
  let bLo = solve(B, aHi, undefined);
  let bHi = solve(B, null, undefined);
  let aLo = solve(A, bHi, undefined);
  let gap = bracketGap(aHi, aLo, bHi, bLo);
  let iterations = 0;
  let lastGap = Infinity;
  let stuck = 0;
  p.onProgress?.(0, gap);
  while (gap > tol && iterations < maxIter) {
    aHi = solve(A, bLo, aHi);
    bLo = solve(B, aHi, bLo);
    aLo = solve(A, bHi, aLo);
    bHi = solve(B, aLo, bHi);
    iterations++;
    gap = bracketGap(aHi, aLo, bHi, bLo);
    p.onProgress?.(iterations, gap);
    // A bracket that no longer narrows (both chains at rest, apart) means two steady states.
    if (gap > 0.999 * lastGap) {
      if (++stuck >= 5) break;
    } else stuck = 0;
    lastGap = gap;
  }
  const converged = gap <= tol;
  if (!converged && stuck >= 5) {
    const ev = evolveFromZero(p, tol, maxIter, linTol);
    return { a: ev.a, b: ev.b, iterations: iterations + ev.steps, linearIterations: linearIterations + ev.linearIterations, gap, converged: ev.settled, unique: false, method: 'evolved' };
  }
  const a = new Float64Array(n), b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    a[i] = 0.5 * (aHi[i] + aLo[i]);
    b[i] = 0.5 * (bHi[i] + bLo[i]);
  }
  return { a, b, iterations, linearIterations, gap, converged, unique: true, method: 'bracket' };
}

// ---------------------------------------------------------------------------------------------

/** Semi-implicit Euler from a = b = 0 with growing Δt (see the module comment). */
function evolveFromZero(p: BorderProblem, tol: number, maxSteps: number, linTol: number) {
  const { grid, boundary } = p;
  const [A, B] = p.species;
  const n = grid.nx * grid.ny * grid.nz;
  let a: Float64Array = new Float64Array(n), b: Float64Array = new Float64Array(n);
  const srcA = new Float64Array(n), srcB = new Float64Array(n);
  const kMin = Math.min(A.decay, B.decay), kMax = Math.max(A.decay, B.decay);
  const dtMax = 2 / kMin;
  let dt = 0.05 / kMax;
  let linearIterations = 0;
  let settled = false;
  let steps = 0;
  while (steps < maxSteps) {
    const inv = 1 / dt;
    for (let i = 0; i < n; i++) {
      srcA[i] = A.production[i] * hillRepression(b[i], A.repression, A.hill) + inv * a[i];
      srcB[i] = B.production[i] * hillRepression(a[i], B.repression, B.hill) + inv * b[i];
    }
    const sa = solveSteadyReactionDiffusion({ grid, boundary, diffusion: A.diffusion, decay: A.decay + inv, source: srcA, tolerance: linTol, initial: a });
    const sb = solveSteadyReactionDiffusion({ grid, boundary, diffusion: B.diffusion, decay: B.decay + inv, source: srcB, tolerance: linTol, initial: b });
    linearIterations += sa.iterations + sb.iterations;
    const change = Math.max(relChange(sa.c, a), relChange(sb.c, b));
    a = sa.c;
    b = sb.c;
    steps++;
    p.onProgress?.(steps, change);
    if (dt >= dtMax && change <= 0.1 * tol) {
      settled = true;
      break;
    }
    dt = Math.min(dtMax, dt * 1.25);
  }
  return { a, b, steps, linearIterations, settled };
}

/** ‖next − prev‖∞ / ‖next‖∞ */
function relChange(next: Float64Array, prev: Float64Array): number {
  return relSpread(next, prev);
}

function bracketGap(aHi: Float64Array, aLo: Float64Array, bHi: Float64Array, bLo: Float64Array): number {
  return Math.max(relSpread(aHi, aLo), relSpread(bHi, bLo));
}

/** ‖hi − lo‖∞ / ‖hi‖∞ (0 when hi is identically 0) */
function relSpread(hi: Float64Array, lo: Float64Array): number {
  let d = 0, m = 0;
  for (let i = 0; i < hi.length; i++) {
    const e = Math.abs(hi[i] - lo[i]);
    if (e > d) d = e;
    const v = Math.abs(hi[i]);
    if (v > m) m = v;
  }
  return m > 0 ? d / m : 0;
}
