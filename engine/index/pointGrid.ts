// Points-within-radius over points that all move every step (growth-cone terminals), rebuilt
// from scratch each step: a cell list built by counting sort, on typed arrays.
//
// Build is O(points + cells): one pass assigns each point its cell and counts per cell, a
// prefix sum turns counts into cell ends, and a backward pass drops every point into place
// while walking those ends back to cell starts. Points of one cell are then contiguous, and so
// are the points of a run of cells along x, so a query reads one contiguous range per (y, z)
// row of the cells its box touches. Points outside `bounds` are clamped into the border cells;
// since clamping is monotone the query stays exact, the border cells just get fuller.
// Pass the previous grid back in to reuse its arrays: a per-step rebuild then allocates nothing.

export interface PointGridBounds {
  minX: number;
  minY: number;
  minZ: number;
  maxX: number;
  maxY: number;
  maxZ: number;
}

export interface PointGrid {
  /** cell edge actually used, µm (enlarged when bounds / cellSize would need too many cells) */
  cellSize: number;
  minX: number;
  minY: number;
  minZ: number;
  nx: number;
  ny: number;
  nz: number;
  /** number of points */
  count: number;
  /** points of cell c are sorted positions cellStart[c] .. cellStart[c+1]-1 */
  cellStart: Int32Array;
  /** sorted position → index of the point in the input array */
  order: Int32Array;
  /** coordinates in sorted order (x, y, z interleaved), for a cache-friendly scan */
  sorted: Float64Array;
  /** scratch: cell of each input point */
  cellOf: Int32Array;
}

/** Most cells a grid may have, relative to its point count; beyond it the cell grows. */
const MAX_CELLS_PER_POINT = 8;
const MIN_CELL_BUDGET = 4096;

/** Sorts `count` points xyz[3i..3i+2] into cells of edge `cellSize` over `bounds`. */
export function buildPointGrid(
  xyz: Float64Array,
  count: number,
  cellSize: number,
  bounds: PointGridBounds,
  reuse?: PointGrid,
): PointGrid {
  if (!(cellSize > 0) || !Number.isFinite(cellSize)) throw new RangeError(`cellSize must be > 0, got ${cellSize}`);
  if (xyz.length < count * 3) throw new RangeError(`xyz holds ${xyz.length / 3} points, count is ${count}`);
  const { minX, minY, minZ, maxX, maxY, maxZ } = bounds;
  if (!Number.isFinite(minX + minY + minZ + maxX + maxY + maxZ)) throw new RangeError('point grid bounds must be finite');
  const ex = Math.max(0, bounds.maxX - bounds.minX);
  const ey = Math.max(0, bounds.maxY - bounds.minY);
  const ez = Math.max(0, bounds.maxZ - bounds.minZ);
  // Too fine a grid over a large box would cost more to clear than the points cost to sort.
  const budget = Math.max(MIN_CELL_BUDGET, MAX_CELLS_PER_POINT * count);
  let cs = cellSize;
  while (cellsFor(ex, cs) * cellsFor(ey, cs) * cellsFor(ez, cs) > budget) cs *= 1.25;
  const nx = cellsFor(ex, cs), ny = cellsFor(ey, cs), nz = cellsFor(ez, cs);
  const ncells = nx * ny * nz;

  const g = reuse ?? emptyGrid();
  g.cellSize = cs;
  g.minX = bounds.minX;
  g.minY = bounds.minY;
  g.minZ = bounds.minZ;
  g.nx = nx;
  g.ny = ny;
  g.nz = nz;
  g.count = count;
  if (g.cellStart.length < ncells + 1) g.cellStart = new Int32Array(ncells + 1);
  if (g.order.length < count) {
    g.order = new Int32Array(count);
    g.cellOf = new Int32Array(count);
    g.sorted = new Float64Array(count * 3);
  }
  const start = g.cellStart, order = g.order, cellOf = g.cellOf, sorted = g.sorted;
  start.fill(0, 0, ncells + 1);

  const inv = 1 / cs;
  for (let i = 0; i < count; i++) {
    const c = cellIndex(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2], g, inv);
    cellOf[i] = c;
    start[c]++;
  }
  // start[c] = end of cell c (exclusive) ...
  for (let c = 1; c < ncells; c++) start[c] += start[c - 1];
  start[ncells] = count;
  // ... walked back to the start of cell c; the backward pass keeps input order within a cell.
  for (let i = count - 1; i >= 0; i--) {
    const k = --start[cellOf[i]];
    order[k] = i;
    sorted[3 * k] = xyz[3 * i];
    sorted[3 * k + 1] = xyz[3 * i + 1];
    sorted[3 * k + 2] = xyz[3 * i + 2];
  }
  return g;
}

/** Calls visit(index, distance) for every point within r of (x, y, z) (distance ≤ r). */
export function pointsWithin(
  g: PointGrid,
  x: number,
  y: number,
  z: number,
  r: number,
  visit: (index: number, distance: number) => void,
): void {
  if (g.count === 0 || !(r >= 0)) return;
  const inv = 1 / g.cellSize;
  const e = r + 1e-6; // slack so rounding in the cell range never culls a point at exactly r
  const ix0 = clampCell(Math.floor((x - e - g.minX) * inv), g.nx), ix1 = clampCell(Math.floor((x + e - g.minX) * inv), g.nx);
  const iy0 = clampCell(Math.floor((y - e - g.minY) * inv), g.ny), iy1 = clampCell(Math.floor((y + e - g.minY) * inv), g.ny);
  const iz0 = clampCell(Math.floor((z - e - g.minZ) * inv), g.nz), iz1 = clampCell(Math.floor((z + e - g.minZ) * inv), g.nz);
  const r2 = r * r, start = g.cellStart, sorted = g.sorted, order = g.order;
  for (let k = iz0; k <= iz1; k++) {
    for (let j = iy0; j <= iy1; j++) {
      const row = (k * g.ny + j) * g.nx;
      const end = start[row + ix1 + 1];
      for (let q = start[row + ix0]; q < end; q++) {
        const dx = sorted[3 * q] - x, dy = sorted[3 * q + 1] - y, dz = sorted[3 * q + 2] - z;
        const d2 = dx * dx + dy * dy + dz * dz;
        if (d2 <= r2) visit(order[q], Math.sqrt(d2));
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------

function emptyGrid(): PointGrid {
  return {
    cellSize: 1, minX: 0, minY: 0, minZ: 0, nx: 1, ny: 1, nz: 1, count: 0,
    cellStart: new Int32Array(0), order: new Int32Array(0), sorted: new Float64Array(0), cellOf: new Int32Array(0),
  };
}

function cellsFor(extent: number, cs: number): number {
  return Math.max(1, Math.floor(extent / cs) + 1);
}

/** Clamps a cell coordinate into 0..n-1 (NaN goes to 0; such a point never passes d² ≤ r²). */
function clampCell(i: number, n: number): number {
  return i >= n ? n - 1 : i >= 0 ? i : 0;
}

function cellIndex(x: number, y: number, z: number, g: PointGrid, inv: number): number {
  const i = clampCell(Math.floor((x - g.minX) * inv), g.nx);
  const j = clampCell(Math.floor((y - g.minY) * inv), g.ny);
  const k = clampCell(Math.floor((z - g.minZ) * inv), g.nz);
  return (k * g.ny + j) * g.nx + i;
}
