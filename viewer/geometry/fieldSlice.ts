// Planar slices through a volume field grid (run store "volume" space: array [nz, ny, nx], node
// (i, j, k) at origin + (i, j, k)·spacing), for the cue panel's slice plane. Between two grid
// planes the slice is interpolated linearly, so moving the plane changes the picture smoothly.

export type SliceAxis = 'x' | 'y' | 'z';

export interface VolumeGrid {
  data: Float32Array;
  nx: number;
  ny: number;
  nz: number;
  origin: [number, number, number];
  spacing: number;
}

export interface Slice {
  /** values row by row: `height` rows of `width` values; row r, column c */
  values: Float32Array;
  width: number;
  height: number;
  /** the world axes the image's columns and rows run along */
  across: SliceAxis;
  up: SliceAxis;
  /** world coordinates of column 0 / last column, row 0 / last row, and of the plane */
  acrossRange: [number, number];
  upRange: [number, number];
  at: number;
}

const PLANE: Record<SliceAxis, { across: SliceAxis; up: SliceAxis }> = {
  x: { across: 'y', up: 'z' },
  y: { across: 'x', up: 'z' },
  z: { across: 'x', up: 'y' },
};

/** The slice perpendicular to `axis` at world coordinate `at` µm (clamped into the grid). */
export function sliceVolume(g: VolumeGrid, axis: SliceAxis, at: number): Slice {
  const n = { x: g.nx, y: g.ny, z: g.nz };
  const o = { x: g.origin[0], y: g.origin[1], z: g.origin[2] };
  const { across, up } = PLANE[axis];
  const t = Math.min(Math.max((at - o[axis]) / g.spacing, 0), n[axis] - 1);
  const i0 = Math.floor(t), i1 = Math.min(i0 + 1, n[axis] - 1), w = t - i0;
  const width = n[across], height = n[up];
  const values = new Float32Array(width * height);
  const idx = (x: number, y: number, z: number) => (z * g.ny + y) * g.nx + x;
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++) {
      const p0 = { x: 0, y: 0, z: 0 };
      p0[across] = c;
      p0[up] = r;
      p0[axis] = i0;
      const a = g.data[idx(p0.x, p0.y, p0.z)];
      p0[axis] = i1;
      const b = g.data[idx(p0.x, p0.y, p0.z)];
      values[r * width + c] = a + (b - a) * w;
    }
  }
  return {
    values, width, height, across, up,
    acrossRange: [o[across], o[across] + (width - 1) * g.spacing],
    upRange: [o[up], o[up] + (height - 1) * g.spacing],
    at: o[axis] + t * g.spacing,
  };
}

/** Value range of an array, ignoring non-finite entries. */
export function valueRange(values: ArrayLike<number>): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  return lo <= hi ? [lo, hi] : [0, 0];
}
