/**
 * Trilinear sampling of a node-centred grid field, value and gradient.
 *
 * Grid convention (shared with gridSolver.ts): node (i, j, k) sits at
 * origin + (i·h, j·h, k·h), flat index i + nx·(j + ny·k), x fastest.
 *
 * The gradient returned is the exact gradient of the trilinear interpolant, so value and
 * gradient are mutually consistent (a growth cone that follows `grad` climbs `value`).
 * Outside the grid the position is clamped onto it; along an axis where the point lies
 * strictly outside, the clamped field does not vary, so that gradient component is 0.
 * An axis with a single node (a 2D or 1D grid) contributes nothing and has zero gradient.
 *
 * `sample` is on the engine's hot path: no allocation, no closures, one branch per axis.
 */

import type { GridSpec } from './gridSolver.ts';

export class GridSampler {
  readonly grid: GridSpec;
  readonly values: Float64Array | Float32Array;
  private readonly ox: number;
  private readonly oy: number;
  private readonly oz: number;
  private readonly invH: number;
  // Largest valid cell index per axis (n − 2), or 0 for a single-node axis.
  private readonly ci: number;
  private readonly cj: number;
  private readonly ck: number;
  // Index strides to the upper corner of a cell; 0 on a single-node axis so the
  // "upper" corner is the same node and the lerp along that axis is a no-op.
  private readonly sx: number;
  private readonly sy: number;
  private readonly sz: number;
  // Extent in grid units (n − 1) per axis, for clamping.
  private readonly ux: number;
  private readonly uy: number;
  private readonly uz: number;

  constructor(
    grid: GridSpec,
    values: Float64Array | Float32Array,
    origin: [number, number, number] = [0, 0, 0],
  ) {
    const { nx, ny, nz, h } = grid;
    if (!(nx >= 1 && ny >= 1 && nz >= 1) || !Number.isInteger(nx * ny * nz)) {
      throw new RangeError(`GridSampler: bad grid size ${nx}×${ny}×${nz}`);
    }
    if (!(h > 0)) throw new RangeError(`GridSampler: spacing h must be > 0, got ${h}`);
    if (values.length !== nx * ny * nz) {
      throw new RangeError(`GridSampler: ${values.length} values for ${nx * ny * nz} nodes`);
    }
    this.grid = grid;
    this.values = values;
    this.ox = origin[0];
    this.oy = origin[1];
    this.oz = origin[2];
    this.invH = 1 / h;
    this.ci = Math.max(nx - 2, 0);
    this.cj = Math.max(ny - 2, 0);
    this.ck = Math.max(nz - 2, 0);
    this.sx = nx > 1 ? 1 : 0;
    this.sy = ny > 1 ? nx : 0;
    this.sz = nz > 1 ? nx * ny : 0;
    this.ux = nx - 1;
    this.uy = ny - 1;
    this.uz = nz - 1;
  }

  /** trilinear value at (x,y,z) µm; writes the gradient of the trilinear interpolant (∂c/∂x, ∂c/∂y, ∂c/∂z) into grad[0..2]; clamps to the grid outside it */
  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const invH = this.invH;
    // Position in grid units, clamped; `gx` etc. is 0 where the point was clamped.
    let u = (x - this.ox) * invH;
    let v = (y - this.oy) * invH;
    let w = (z - this.oz) * invH;
    let gx = invH;
    let gy = invH;
    let gz = invH;
    if (!(u >= 0)) { u = 0; gx = 0; } else if (u > this.ux) { u = this.ux; gx = 0; }
    if (!(v >= 0)) { v = 0; gy = 0; } else if (v > this.uy) { v = this.uy; gy = 0; }
    if (!(w >= 0)) { w = 0; gz = 0; } else if (w > this.uz) { w = this.uz; gz = 0; }

    // Cell index: truncation is floor for u ≥ 0; the top face belongs to the last cell.
    let i = u | 0;
    let j = v | 0;
    let k = w | 0;
    if (i > this.ci) i = this.ci;
    if (j > this.cj) j = this.cj;
    if (k > this.ck) k = this.ck;
    const tx = u - i;
    const ty = v - j;
    const tz = w - k;

    const a = this.values;
    const sx = this.sx;
    const sy = this.sy;
    const sz = this.sz;
    const n000 = i + this.grid.nx * (j + this.grid.ny * k);
    const c000 = a[n000];
    const c100 = a[n000 + sx];
    const c010 = a[n000 + sy];
    const c110 = a[n000 + sy + sx];
    const c001 = a[n000 + sz];
    const c101 = a[n000 + sz + sx];
    const c011 = a[n000 + sz + sy];
    const c111 = a[n000 + sz + sy + sx];

    // x-differences on the four x-edges of the cell.
    const e00 = c100 - c000;
    const e10 = c110 - c010;
    const e01 = c101 - c001;
    const e11 = c111 - c011;
    // Lerp along x, then y, then z.
    const c00 = c000 + tx * e00;
    const c10 = c010 + tx * e10;
    const c01 = c001 + tx * e01;
    const c11 = c011 + tx * e11;
    const dy0 = c10 - c00;
    const dy1 = c11 - c01;
    const c0 = c00 + ty * dy0;
    const c1 = c01 + ty * dy1;

    // ∂/∂x: the x-differences lerped in y and z; ∂/∂y: y-differences lerped in z; ∂/∂z: c1 − c0.
    const ey0 = e00 + ty * (e10 - e00);
    const ey1 = e01 + ty * (e11 - e01);
    grad[0] = gx * (ey0 + tz * (ey1 - ey0));
    grad[1] = gy * (dy0 + tz * (dy1 - dy0));
    grad[2] = gz * (c1 - c0);
    return c0 + tz * (c1 - c0);
  }
}
