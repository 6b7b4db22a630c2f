/**
 * Steady reaction–diffusion on the node-centred volume grid.
 *
 *     D ∇²c − k c + s(x) = 0
 *
 * is the steady state of ∂c/∂t = D∇²c − kc + s (Crank, The Mathematics of Diffusion, 2nd ed.
 * 1975; Berg, Random Walks in Biology, 1983). It is discretised with the 7-point stencil and
 * solved matrix-free by conjugate gradient, preconditioned by a geometric multigrid V-cycle
 * where the grid can be halved, else by the diagonal (Jacobi). Measured (test/bench/
 * gridSolver.bench.ts) the V-cycle cuts 121³ solves from 215–460 CG iterations to about 10
 * and the wall time 4–7×, so it is the default.
 *
 * Grid convention (fixed; gridSampler.ts and the cue kinds rely on it): nx = round(Lx/h)+1
 * nodes per axis, node (i,j,k) at (i·h, j·h, k·h), flat index i + nx·(j + ny·k), x fastest
 * (as a numpy array the shape is [nz, ny, nx]).
 *
 * Walls
 *  - absorbing: the outer faces are Dirichlet nodes with c = 0.
 *  - reflecting: zero normal flux, by mirror ghost nodes (c₋₁ = c₁). The mirrored row of a
 *    face node reads D(2c₀ − 2c₁)/h², whose off-diagonal (−2D/h²) does not match the
 *    neighbour's (−D/h²), so the plain matrix is not symmetric. We multiply every row by its
 *    node's control-volume fraction w (½ per axis on which the node is on a face: ½ on a
 *    face, ¼ on an edge, ⅛ at a corner). Then the coupling between two nodes is −D/h² times
 *    the fraction of the face they share, identical seen from either side: W·A is symmetric,
 *    and positive definite for k > 0. This is the finite-volume form of the same equations
 *    (same solution), and it makes the discrete mass balance exact in the trapezoidal
 *    integral: Σ w (k c − s) = 0, i.e. k·∫c = ∫s (see gridIntegral).
 *  - fixed nodes (optional mask) are Dirichlet nodes held at the given value; they override
 *    walls, so c(0) = c₀ on an absorbing face is possible.
 *  An axis with a single node is degenerate: no walls and no diffusion across it, so a
 *  1 × 1 × n or n × n × 1 grid solves the 1D or 2D problem.
 *
 * Dirichlet nodes are kept in the vectors but masked out of the system (weight 0), so the
 * stencil loop has no branches and their values enter the right-hand side through the
 * initial residual.
 */

export type Boundary = 'absorbing' | 'reflecting';

export interface GridSpec {
  nx: number;
  ny: number;
  nz: number;
  /** node spacing, µm */
  h: number;
}

export interface SteadyProblem {
  grid: GridSpec;
  /** D, µm²/s */
  diffusion: number;
  /** k, 1/s (may be 0 only with absorbing walls or fixed nodes) */
  decay: number;
  /** s(x) per node, concentration/s (production density) */
  source: Float64Array;
  /** absorbing: c = 0 on the outer faces (Dirichlet); reflecting: zero flux (Neumann, mirror ghost nodes) */
  boundary: Boundary;
  /** optional Dirichlet nodes held at a value (mask ≠ 0); they override walls */
  fixed?: { mask: Uint8Array; value: Float64Array };
  /** relative residual ‖r‖₂/‖b‖₂ of the (control-volume-weighted) system, default 1e-8 */
  tolerance?: number;
  /** default max(1000, 20·(nx+ny+nz)); on reaching it the last iterate is returned: check relResidual */
  maxIterations?: number;
  /** optional starting guess (e.g. the previous solve when iterating coupled fields); not modified */
  initial?: Float64Array;
  /**
   * 'multigrid' (default): CG preconditioned by a geometric multigrid V-cycle, used when every
   * axis with more than one node has an even number of cells (n − 1) so it can be halved at
   * least once and the coarsest level is small (≤ 40 000 nodes); otherwise, or with
   * 'jacobi', CG preconditioned by the diagonal. Both solve the same discrete system.
   */
  preconditioner?: 'multigrid' | 'jacobi';
  onProgress?: (iteration: number, relResidual: number) => void;
}

export interface SteadySolution {
  c: Float64Array;
  iterations: number;
  relResidual: number;
}

export type GridFace = 'x-' | 'x+' | 'y-' | 'y+' | 'z-' | 'z+';

/**
 * Solve D∇²c − kc + s = 0 on the grid. Returns the node values, the number of CG iterations
 * and the final relative residual (≤ tolerance unless maxIterations was reached).
 */
export function solveSteadyReactionDiffusion(p: SteadyProblem): SteadySolution {
  const { grid, diffusion: D, decay: k, source, boundary } = p;
  const { nx, ny, nz } = grid;
  const n = checkGrid(grid);
  if (!(D > 0)) throw new RangeError(`diffusion must be > 0, got ${D}`);
  if (!(k >= 0)) throw new RangeError(`decay must be ≥ 0, got ${k}`);
  if (source.length !== n) throw new RangeError(`source has ${source.length} values for ${n} nodes`);
  if (boundary !== 'absorbing' && boundary !== 'reflecting') {
    throw new RangeError(`boundary must be 'absorbing' or 'reflecting', got ${String(boundary)}`);
  }
  const fixed = p.fixed;
  if (fixed && (fixed.mask.length !== n || fixed.value.length !== n)) {
    throw new RangeError('fixed.mask and fixed.value must have one entry per node');
  }
  if (p.initial && p.initial.length !== n) throw new RangeError('initial must have one entry per node');
  const tol = p.tolerance ?? 1e-8;
  const maxIter = p.maxIterations ?? Math.max(1000, 20 * (nx + ny + nz));

  const fine = buildLevel(grid, D, k, boundary === 'absorbing', fixed?.mask);
  if (k === 0 && !fine.hasDirichlet) {
    throw new RangeError('decay k = 0 with reflecting walls and no fixed nodes is singular');
  }
  const levels = p.preconditioner === 'jacobi' ? [fine] : buildHierarchy(fine, D, k, grid.h);

  // c: Dirichlet values in place, free nodes start at 0 (or the initial guess).
  const c = new Float64Array(n);
  if (fixed) {
    for (let i = 0; i < n; i++) if (fixed.mask[i] !== 0) c[i] = fixed.value[i];
  }
  const r = new Float64Array(n);
  const q = new Float64Array(n);
  const dir = new Float64Array(n);

  // ‖b‖ with b = W s + (Dirichlet neighbours): the residual of c with free nodes at 0.
  const weight = fine.weight;
  applyOperator(fine, c, q);
  let bb = 0;
  for (let i = 0; i < n; i++) {
    const b = weight[i] * source[i] - q[i];
    r[i] = b;
    bb += b * b;
  }
  if (bb === 0) {
    // Homogeneous problem: the unique solution is 0 on the free nodes.
    return { c, iterations: 0, relResidual: 0 };
  }
  if (p.initial) {
    const init = p.initial;
    for (let i = 0; i < n; i++) if (weight[i] > 0) c[i] = init[i];
    applyOperator(fine, c, q);
    for (let i = 0; i < n; i++) r[i] = weight[i] * source[i] - q[i];
  }
  const bNorm = Math.sqrt(bb);
  const run =
    levels.length > 1
      ? cgMultigrid(levels, c, r, dir, q, new Float64Array(n), bNorm, tol, maxIter, p.onProgress)
      : cgJacobi(fine, c, r, dir, q, bNorm, tol, maxIter, p.onProgress);
  return { c, iterations: run.iterations, relResidual: run.rel };
}

/**
 * Add a point source of rate Q (amount/s) at `position` (µm, relative to `origin`, which
 * defaults to node (0,0,0)) into `source`, spread trilinearly over the 8 surrounding nodes.
 *
 * Trilinear spreading (the adjoint of trilinear sampling) moves the source continuously with
 * its position instead of jumping between nodes, and it preserves both the total and the
 * centroid, so the far field is that of a point at the true position. Each node's share is
 * divided by its control volume w·h³ (w < 1 only on faces), so the trapezoidal integral of
 * the source, Σ w s h³ (gridIntegral), is exactly Q. Shares that land on absorbing-wall
 * nodes are lost to the wall, as a source at the wall would be. Positions outside the grid
 * are clamped onto it. Returns `source` (allocated if omitted).
 */
export function addPointSource(
  grid: GridSpec,
  position: ArrayLike<number>,
  rate: number,
  source?: Float64Array,
  origin: ArrayLike<number> = [0, 0, 0],
): Float64Array {
  const n = checkGrid(grid);
  const out = source ?? new Float64Array(n);
  if (out.length !== n) throw new RangeError(`source has ${out.length} values for ${n} nodes`);
  const { nx, ny, nz, h } = grid;
  const [i, tx] = cellOf((position[0] - origin[0]) / h, nx);
  const [j, ty] = cellOf((position[1] - origin[1]) / h, ny);
  const [k, tz] = cellOf((position[2] - origin[2]) / h, nz);
  const density = rate / (h * h * h);
  for (let dk = 0; dk < 2; dk++) {
    const wz = dk ? tz : 1 - tz;
    if (wz === 0) continue;
    for (let dj = 0; dj < 2; dj++) {
      const wy = dj ? ty : 1 - ty;
      if (wy === 0) continue;
      for (let di = 0; di < 2; di++) {
        const wx = di ? tx : 1 - tx;
        if (wx === 0) continue;
        const a = i + di;
        const b = j + dj;
        const cc = k + dk;
        const frac = axisFraction(a, nx) * axisFraction(b, ny) * axisFraction(cc, nz);
        out[a + nx * (b + ny * cc)] += (density * wx * wy * wz) / frac;
      }
    }
  }
  return out;
}

/**
 * Add a uniform flux `flux` (amount per µm² per s, positive into the volume) entering
 * through one outer face, for use with reflecting walls. The flux is deposited as a
 * production density in the half cell of the face nodes: s += flux / (h/2). In the
 * finite-volume row of a face node this reads D(c₀ − c₁)/h + (h/2)(k c₀) = flux, the
 * discrete form of the boundary condition −D ∂c/∂n = flux. Returns `source`.
 */
export function addWallFlux(grid: GridSpec, face: GridFace, flux: number, source?: Float64Array): Float64Array {
  const n = checkGrid(grid);
  const out = source ?? new Float64Array(n);
  if (out.length !== n) throw new RangeError(`source has ${out.length} values for ${n} nodes`);
  const { nx, ny, nz, h } = grid;
  const axis = face[0] === 'x' ? 0 : face[0] === 'y' ? 1 : 2;
  const size = axis === 0 ? nx : axis === 1 ? ny : nz;
  if (size < 2) throw new RangeError(`face ${face} lies on a single-node axis`);
  const at = face[1] === '-' ? 0 : size - 1;
  const density = flux / (0.5 * h);
  for (let kk = 0; kk < nz; kk++) {
    if (axis === 2 && kk !== at) continue;
    for (let jj = 0; jj < ny; jj++) {
      if (axis === 1 && jj !== at) continue;
      for (let ii = 0; ii < nx; ii++) {
        if (axis === 0 && ii !== at) continue;
        out[ii + nx * (jj + ny * kk)] += density;
      }
    }
  }
  return out;
}

/**
 * Trapezoidal integral Σ w v h³ over the grid (w: control-volume fraction of each node, ½ per
 * face axis). It is the integral in which the solver's mass balance k∫c = ∫s holds exactly
 * with reflecting walls. A single-node axis counts as a slab of thickness h.
 */
export function gridIntegral(grid: GridSpec, values: ArrayLike<number>): number {
  const n = checkGrid(grid);
  if (values.length !== n) throw new RangeError(`${values.length} values for ${n} nodes`);
  const { nx, ny, nz, h } = grid;
  let sum = 0;
  for (let k = 0; k < nz; k++) {
    const fz = axisFraction(k, nz);
    for (let j = 0; j < ny; j++) {
      const fyz = fz * axisFraction(j, ny);
      const row = nx * (j + ny * k);
      let s = 0;
      for (let i = 0; i < nx; i++) s += axisFraction(i, nx) * values[row + i];
      sum += fyz * s;
    }
  }
  return sum * h * h * h;
}

// ---------------------------------------------------------------------------------------

function checkGrid(grid: GridSpec): number {
  const { nx, ny, nz, h } = grid;
  for (const m of [nx, ny, nz]) {
    if (!Number.isInteger(m) || m < 1) throw new RangeError(`grid sizes must be positive integers, got ${nx}×${ny}×${nz}`);
  }
  if (!(h > 0)) throw new RangeError(`grid spacing h must be > 0, got ${h}`);
  return nx * ny * nz;
}

/** Control-volume fraction of node index `i` along an axis of `n` nodes: ½ at the ends. */
function axisFraction(i: number, n: number): number {
  return n > 1 && (i === 0 || i === n - 1) ? 0.5 : 1;
}

/** Lower cell index and fractional offset of grid coordinate u, clamped to [0, n−1]. */
function cellOf(u: number, n: number): [number, number] {
  if (n === 1) return [0, 0];
  const uc = u > 0 ? (u < n - 1 ? u : n - 1) : 0;
  const i = Math.min(Math.floor(uc), n - 2);
  return [i, uc - i];
}


/** Whether an axis of n nodes can be halved to (n − 1)/2 + 1 ≥ 3 nodes (a single node stays). */
function canHalve(n: number): boolean {
  return n === 1 || (n >= 5 && (n - 1) % 2 === 0);
}

// ---- levels --------------------------------------------------------------------------------

/** One grid of the hierarchy: its operator W·A and the work vectors its V-cycle step needs. */
interface Level {
  nx: number;
  ny: number;
  nz: number;
  n: number;
  absorbing: boolean;
  coupling: number; // D/h² at this level's spacing
  stencilDiag: number; // 6·coupling + k: the stencil loop always sums six neighbours
  weight: Float64Array; // control-volume fraction, 0 on Dirichlet rows
  invDiag: Float64Array; // 1/(w · true diagonal), 0 on Dirichlet rows
  hasDirichlet: boolean;
  // Transfer to the next coarser level: one 1D stage per halved axis, with its temporaries.
  stages: { inner: number; n: number; outer: number }[];
  tmp: Float64Array[];
  restrictScale: number;
  // V-cycle vectors (right-hand side, correction, residual); b and e stay empty on the finest
  // level, where CG's residual and preconditioned residual play those roles.
  b: Float64Array;
  e: Float64Array;
  res: Float64Array;
  // CG work vectors for the coarsest level's solve.
  cgDir: Float64Array;
  cgQ: Float64Array;
}

const EMPTY = new Float64Array(0);
/** Coarsening stops once a level has at most this many nodes… */
const COARSE_ENOUGH = 5000;
/** …and multigrid is dropped if the coarsest reachable level is still larger than this. */
const COARSEST_MAX = 40000;
const COARSE_TOLERANCE = 1e-10;

function buildLevel(
  grid: GridSpec,
  D: number,
  k: number,
  absorbing: boolean,
  dirichletMask: Uint8Array | undefined,
): Level {
  const { nx, ny, nz, h } = grid;
  const n = nx * ny * nz;
  const weight = new Float64Array(n);
  const invDiag = new Float64Array(n);
  const coupling = D / (h * h);
  const axes = (nx > 1 ? 1 : 0) + (ny > 1 ? 1 : 0) + (nz > 1 ? 1 : 0);
  // A single-node axis couples a node to itself in the stencil loop, which cancels; the
  // true diagonal (for Jacobi and Gauss–Seidel) leaves it out.
  const trueDiag = 2 * axes * coupling + k;
  let hasDirichlet = false;
  for (let kk = 0; kk < nz; kk++) {
    const fz = axisFraction(kk, nz);
    for (let j = 0; j < ny; j++) {
      const fyz = fz * axisFraction(j, ny);
      const row = nx * (j + ny * kk);
      for (let i = 0; i < nx; i++) {
        const f = fyz * axisFraction(i, nx);
        const idx = row + i;
        // On an absorbing grid every node with f < 1 is on a wall.
        const dirichlet = (absorbing && f < 1) || (dirichletMask !== undefined && dirichletMask[idx] !== 0);
        if (dirichlet) {
          hasDirichlet = true;
        } else {
          weight[idx] = f;
          invDiag[idx] = 1 / (f * trueDiag);
        }
      }
    }
  }
  return {
    nx, ny, nz, n, absorbing, coupling,
    stencilDiag: 6 * coupling + k,
    weight, invDiag, hasDirichlet,
    stages: [], tmp: [], restrictScale: 1,
    b: EMPTY, e: EMPTY, res: EMPTY, cgDir: EMPTY, cgQ: EMPTY,
  };
}

/**
 * Coarse levels by halving every axis with more than one node, rediscretised with the same
 * walls at spacing 2h. A coarse node is Dirichlet where its fine counterpart (node 2I) is.
 * Returns just [fine] when the grid cannot be coarsened far enough to be worth it.
 */
function buildHierarchy(fine: Level, D: number, k: number, h: number): Level[] {
  const levels = [fine];
  let f = fine;
  let hf = h;
  while (f.n > COARSE_ENOUGH && canHalve(f.nx) && canHalve(f.ny) && canHalve(f.nz)) {
    const nxc = f.nx > 1 ? (f.nx - 1) / 2 + 1 : 1;
    const nyc = f.ny > 1 ? (f.ny - 1) / 2 + 1 : 1;
    const nzc = f.nz > 1 ? (f.nz - 1) / 2 + 1 : 1;
    const mask = new Uint8Array(nxc * nyc * nzc);
    const sx = f.nx > 1 ? 2 : 0;
    const sy = f.ny > 1 ? 2 : 0;
    const sz = f.nz > 1 ? 2 : 0;
    for (let kk = 0; kk < nzc; kk++) {
      for (let j = 0; j < nyc; j++) {
        for (let i = 0; i < nxc; i++) {
          const fi = sx * i + f.nx * (sy * j + f.ny * sz * kk);
          mask[i + nxc * (j + nyc * kk)] = f.weight[fi] === 0 ? 1 : 0;
        }
      }
    }
    const c = buildLevel({ nx: nxc, ny: nyc, nz: nzc, h: 2 * hf }, D, k, f.absorbing, mask);
    if (k === 0 && !c.hasDirichlet) break; // a coarse Neumann problem without decay is singular
    // 1D transfer stages x → y → z, skipping single-node axes.
    const dims = [f.nx, f.ny, f.nz];
    for (let axis = 0; axis < 3; axis++) {
      if (dims[axis] === 1) continue;
      const inner = axis === 0 ? 1 : axis === 1 ? dims[0] : dims[0] * dims[1];
      const outer = axis === 0 ? dims[1] * dims[2] : axis === 1 ? dims[2] : 1;
      f.stages.push({ inner, n: dims[axis], outer });
      dims[axis] = (dims[axis] - 1) / 2 + 1;
      f.tmp.push(new Float64Array(dims[0] * dims[1] * dims[2]));
    }
    f.tmp.pop(); // the last stage writes straight into the coarse level's vector
    f.restrictScale = 1 / (1 << f.stages.length);
    f.res = new Float64Array(f.n);
    c.b = new Float64Array(c.n);
    c.e = new Float64Array(c.n);
    levels.push(c);
    f = c;
    hf *= 2;
  }
  if (levels.length === 1 || f.n > COARSEST_MAX) return [fine];
  f.res = new Float64Array(f.n);
  f.cgDir = new Float64Array(f.n);
  f.cgQ = new Float64Array(f.n);
  return levels;
}

// ---- Krylov loops --------------------------------------------------------------------------

/**
 * Jacobi-preconditioned CG (e.g. Saad, Iterative Methods for Sparse Linear Systems, 2nd ed.
 * 2003, ch. 9) on level L. On entry `r` is the residual of `c`; z = M⁻¹r is folded into the
 * passes so no z vector is stored.
 */
function cgJacobi(
  L: Level,
  c: Float64Array,
  r: Float64Array,
  dir: Float64Array,
  q: Float64Array,
  bNorm: number,
  tol: number,
  maxIter: number,
  onProgress: ((iteration: number, relResidual: number) => void) | undefined,
): { iterations: number; rel: number } {
  const n = L.n;
  const invDiag = L.invDiag;
  let rz = 0;
  let rr = 0;
  for (let i = 0; i < n; i++) {
    const z = invDiag[i] * r[i];
    dir[i] = z;
    rz += r[i] * z;
    rr += r[i] * r[i];
  }
  let rel = Math.sqrt(rr) / bNorm;
  let it = 0;
  while (rel > tol && it < maxIter) {
    const pq = applyOperator(L, dir, q);
    if (!(pq > 0)) break; // breakdown: only once the residual is at rounding level
    const alpha = rz / pq;
    let rzNew = 0;
    rr = 0;
    for (let i = 0; i < n; i++) {
      c[i] += alpha * dir[i];
      const ri = r[i] - alpha * q[i];
      r[i] = ri;
      const r2 = ri * ri;
      rzNew += r2 * invDiag[i];
      rr += r2;
    }
    const beta = rzNew / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) dir[i] = invDiag[i] * r[i] + beta * dir[i];
    it++;
    rel = Math.sqrt(rr) / bNorm;
    if (onProgress) onProgress(it, rel);
  }
  return { iterations: it, rel };
}

/**
 * CG preconditioned by one symmetric multigrid V-cycle per iteration. The coarsest level is
 * solved iteratively, so the preconditioner is very slightly non-constant; the Polak–Ribière
 * form β = zₙ·(rₙ − rₙ₋₁)/(zₙ₋₁·rₙ₋₁) = −α zₙ·q / (zₙ₋₁·rₙ₋₁) ("flexible" CG, Notay, SIAM J. Sci.
 * Comput. 22, 2000, from memory) keeps it robust to that at no extra storage.
 */
function cgMultigrid(
  levels: Level[],
  c: Float64Array,
  r: Float64Array,
  dir: Float64Array,
  q: Float64Array,
  z: Float64Array,
  bNorm: number,
  tol: number,
  maxIter: number,
  onProgress: ((iteration: number, relResidual: number) => void) | undefined,
): { iterations: number; rel: number } {
  const fine = levels[0];
  const n = fine.n;
  vcycle(levels, 0, r, z);
  let rz = 0;
  let rr = 0;
  for (let i = 0; i < n; i++) {
    dir[i] = z[i];
    rz += r[i] * z[i];
    rr += r[i] * r[i];
  }
  let rel = Math.sqrt(rr) / bNorm;
  let it = 0;
  while (rel > tol && it < maxIter) {
    const pq = applyOperator(fine, dir, q);
    if (!(pq > 0) || !(rz > 0)) break;
    const alpha = rz / pq;
    rr = 0;
    for (let i = 0; i < n; i++) {
      c[i] += alpha * dir[i];
      const ri = r[i] - alpha * q[i];
      r[i] = ri;
      rr += ri * ri;
    }
    it++;
    rel = Math.sqrt(rr) / bNorm;
    if (onProgress) onProgress(it, rel);
    if (rel <= tol) break;
    vcycle(levels, 0, r, z);
    let rzNew = 0;
    let zq = 0;
    for (let i = 0; i < n; i++) {
      rzNew += r[i] * z[i];
      zq += z[i] * q[i];
    }
    const beta = (-alpha * zq) / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) dir[i] = z[i] + beta * dir[i];
  }
  return { iterations: it, rel };
}

// ---- multigrid -----------------------------------------------------------------------------

/**
 * e ≈ B⁻¹b by one V(1,1)-cycle from e = 0 (Briggs, Henson & McCormick, A Multigrid Tutorial,
 * 2nd ed. 2000): red–black Gauss–Seidel before (red, black) and after (black, red, so the
 * cycle is symmetric), full-weighting restriction, trilinear prolongation. The Galerkin
 * product Pᵀ(W A)P on the fine grid approximates 2^m × the rediscretised coarse W A (m halved
 * axes), hence the restriction scale 1/2^m.
 */
function vcycle(levels: Level[], l: number, b: Float64Array, e: Float64Array): void {
  const L = levels[l];
  if (l === levels.length - 1) {
    solveCoarsest(L, b, e);
    return;
  }
  e.fill(0);
  relaxRedBlack(L, b, e, 0);
  relaxRedBlack(L, b, e, 1);
  const res = L.res;
  applyOperator(L, e, res);
  for (let i = 0; i < L.n; i++) res[i] = b[i] - res[i];
  const C = levels[l + 1];
  restrict(L, res, C.b);
  const cb = C.b;
  const cw = C.weight;
  const scale = L.restrictScale;
  for (let i = 0; i < C.n; i++) cb[i] = cw[i] !== 0 ? scale * cb[i] : 0;
  vcycle(levels, l + 1, cb, C.e);
  prolong(L, C.e, res);
  const w = L.weight;
  for (let i = 0; i < L.n; i++) if (w[i] !== 0) e[i] += res[i];
  relaxRedBlack(L, b, e, 1);
  relaxRedBlack(L, b, e, 0);
}

/** Coarsest level: Jacobi-CG to a tight tolerance, so the V-cycle is nearly a fixed operator. */
function solveCoarsest(L: Level, b: Float64Array, e: Float64Array): void {
  const r = L.res;
  let bb = 0;
  for (let i = 0; i < L.n; i++) {
    e[i] = 0;
    r[i] = b[i];
    bb += b[i] * b[i];
  }
  if (bb === 0) return;
  cgJacobi(L, e, r, L.cgDir, L.cgQ, Math.sqrt(bb), COARSE_TOLERANCE, 20 * L.n, undefined);
}

/**
 * One Gauss–Seidel half-sweep over the nodes with (i + j + k) mod 2 = colour:
 * e_i += (b_i − (B e)_i) / B_ii. Dirichlet rows have invDiag 0 and stay 0.
 */
function relaxRedBlack(L: Level, b: Float64Array, e: Float64Array, colour: number): void {
  const { nx, ny, nz, weight: w, invDiag: inv, coupling: cp, stencilDiag: d } = L;
  const sxy = nx * ny;
  for (let k = 0; k < nz; k++) {
    const ozm = k > 0 ? -sxy : nz > 1 ? sxy : 0;
    const ozp = k < nz - 1 ? sxy : nz > 1 ? -sxy : 0;
    for (let j = 0; j < ny; j++) {
      const oym = j > 0 ? -nx : ny > 1 ? nx : 0;
      const oyp = j < ny - 1 ? nx : ny > 1 ? -nx : 0;
      const row = nx * (j + ny * k);
      const last = row + nx - 1;
      const i0 = (colour + j + k) & 1; // first i of this colour in the row
      if (nx === 1) {
        if (i0 === 0) {
          const s = 2 * e[row] + e[row + oym] + e[row + oyp] + e[row + ozm] + e[row + ozp];
          e[row] += inv[row] * (b[row] - w[row] * (d * e[row] - cp * s));
        }
        continue;
      }
      if (i0 === 0) {
        const s = 2 * e[row + 1] + e[row + oym] + e[row + oyp] + e[row + ozm] + e[row + ozp];
        e[row] += inv[row] * (b[row] - w[row] * (d * e[row] - cp * s));
      }
      for (let i = row + (i0 === 0 ? 2 : 1); i < last; i += 2) {
        const s = e[i - 1] + e[i + 1] + e[i + oym] + e[i + oyp] + e[i + ozm] + e[i + ozp];
        e[i] += inv[i] * (b[i] - w[i] * (d * e[i] - cp * s));
      }
      if (((nx - 1 + j + k) & 1) === colour) {
        const s = 2 * e[last - 1] + e[last + oym] + e[last + oyp] + e[last + ozm] + e[last + ozp];
        e[last] += inv[last] * (b[last] - w[last] * (d * e[last] - cp * s));
      }
    }
  }
}

/** dst (coarse) = Pᵀ src (fine), one 1D full-weighting stage [½ 1 ½] per halved axis. */
function restrict(L: Level, src: Float64Array, dst: Float64Array): void {
  const stages = L.stages;
  let a = src;
  for (let s = 0; s < stages.length; s++) {
    const out = s === stages.length - 1 ? dst : L.tmp[s];
    const { inner, n, outer } = stages[s];
    restrictAxis(a, inner, n, outer, out);
    a = out;
  }
}

/** dst (fine) = P src (coarse), the stages of `restrict` in reverse, each 1D linear. */
function prolong(L: Level, src: Float64Array, dst: Float64Array): void {
  const stages = L.stages;
  let a = src;
  for (let s = stages.length - 1; s >= 0; s--) {
    const out = s === 0 ? dst : L.tmp[s - 1];
    const { inner, n, outer } = stages[s];
    prolongAxis(a, inner, n, outer, out);
    a = out;
  }
}

/** Along an axis of n fine nodes (stride `inner`): out[I] = in[2I] + ½(in[2I−1] + in[2I+1]). */
function restrictAxis(src: Float64Array, inner: number, n: number, outer: number, dst: Float64Array): void {
  const nc = (n - 1) / 2 + 1;
  for (let o = 0; o < outer; o++) {
    const sBase = o * n * inner;
    const dBase = o * nc * inner;
    // Ends: the missing outside neighbour contributes nothing (transpose of P).
    for (let t = 0; t < inner; t++) {
      dst[dBase + t] = src[sBase + t] + 0.5 * src[sBase + inner + t];
      const sl = sBase + (n - 1) * inner + t;
      dst[dBase + (nc - 1) * inner + t] = src[sl] + 0.5 * src[sl - inner];
    }
    for (let I = 1; I < nc - 1; I++) {
      const s0 = sBase + 2 * I * inner;
      const d0 = dBase + I * inner;
      for (let t = 0; t < inner; t++) {
        dst[d0 + t] = src[s0 + t] + 0.5 * (src[s0 - inner + t] + src[s0 + inner + t]);
      }
    }
  }
}

/** Along an axis of n fine nodes: out[2I] = in[I], out[2I+1] = ½(in[I] + in[I+1]). */
function prolongAxis(src: Float64Array, inner: number, n: number, outer: number, dst: Float64Array): void {
  const nc = (n - 1) / 2 + 1;
  for (let o = 0; o < outer; o++) {
    const sBase = o * nc * inner;
    const dBase = o * n * inner;
    for (let I = 0; I < nc - 1; I++) {
      const s0 = sBase + I * inner;
      const d0 = dBase + 2 * I * inner;
      for (let t = 0; t < inner; t++) {
        const a = src[s0 + t];
        dst[d0 + t] = a;
        dst[d0 + inner + t] = 0.5 * (a + src[s0 + inner + t]);
      }
    }
    const sl = sBase + (nc - 1) * inner;
    const dl = dBase + (n - 1) * inner;
    for (let t = 0; t < inner; t++) dst[dl + t] = src[sl + t];
  }
}

// ---- operator ------------------------------------------------------------------------------

/**
 * out = W·A·x for the 7-point operator A = −D∇²_h + k with mirror ghosts at the faces
 * (rows of Dirichlet nodes come out 0 because their weight is 0). Returns x·out, which CG
 * needs as pᵀAp, so the dot product costs no extra pass.
 *
 * Mirror ghosts are expressed as neighbour offsets: on a face the "outside" offset points
 * back inside (c₋₁ = c₁); on a single-node axis both offsets are 0.
 */
function applyOperator(L: Level, x: Float64Array, out: Float64Array): number {
  const { nx, ny, nz, weight, coupling, stencilDiag: diag } = L;
  const sxy = nx * ny;
  let dot = 0;
  for (let k = 0; k < nz; k++) {
    const ozm = k > 0 ? -sxy : nz > 1 ? sxy : 0;
    const ozp = k < nz - 1 ? sxy : nz > 1 ? -sxy : 0;
    for (let j = 0; j < ny; j++) {
      const oym = j > 0 ? -nx : ny > 1 ? nx : 0;
      const oyp = j < ny - 1 ? nx : ny > 1 ? -nx : 0;
      const row = nx * (j + ny * k);
      const last = row + nx - 1;
      if (nx === 1) {
        const v = weight[row] * (diag * x[row] - coupling * (2 * x[row] + x[row + oym] + x[row + oyp] + x[row + ozm] + x[row + ozp]));
        out[row] = v;
        dot += v * x[row];
        continue;
      }
      // i = 0: mirror ghost x₋₁ = x₁.
      let v = weight[row] * (diag * x[row] - coupling * (2 * x[row + 1] + x[row + oym] + x[row + oyp] + x[row + ozm] + x[row + ozp]));
      out[row] = v;
      dot += v * x[row];
      for (let i = row + 1; i < last; i++) {
        v = weight[i] * (diag * x[i] - coupling * (x[i - 1] + x[i + 1] + x[i + oym] + x[i + oyp] + x[i + ozm] + x[i + ozp]));
        out[i] = v;
        dot += v * x[i];
      }
      // i = nx − 1: mirror ghost x_nx = x_{nx−2}.
      v = weight[last] * (diag * x[last] - coupling * (2 * x[last - 1] + x[last + oym] + x[last + oyp] + x[last + ozm] + x[last + ozp]));
      out[last] = v;
      dot += v * x[last];
    }
  }
  return dot;
}
