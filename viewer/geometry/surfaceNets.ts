// Isosurface of a volume field grid by naive surface nets (S. F. F. Gibson, "Constrained
// elastic surface nets", MERL TR99-24, 1998, in its simplest form without the smoothing step;
// from memory). One vertex per grid cell that the surface crosses, placed at the mean of the
// points where the level is crossed on the cell's edges; one quad for every grid edge that
// crosses the level, joining the four cells around that edge. Needs no case tables, gives
// closed, watertight surfaces inside the grid, and about half the triangles of marching cubes.

export interface IsoMesh {
  positions: Float32Array;
  indices: Uint32Array;
}

/** data: [nz, ny, nx] (x fastest). Vertices are in world units (origin + index·spacing). */
export function surfaceNets(data: ArrayLike<number>, nx: number, ny: number, nz: number, level: number, origin: [number, number, number], spacing: number): IsoMesh {
  const cx = nx - 1, cy = ny - 1, cz = nz - 1;
  if (cx < 1 || cy < 1 || cz < 1) return { positions: new Float32Array(0), indices: new Uint32Array(0) };
  const cellVertex = new Int32Array(cx * cy * cz).fill(-1);
  const pos: number[] = [];
  const v = new Float64Array(8);
  const at = (i: number, j: number, k: number) => data[(k * ny + j) * nx + i];

  for (let k = 0; k < cz; k++) for (let j = 0; j < cy; j++) for (let i = 0; i < cx; i++) {
    let mask = 0;
    for (let c = 0; c < 8; c++) {
      v[c] = at(i + (c & 1), j + ((c >> 1) & 1), k + ((c >> 2) & 1));
      if (v[c] > level) mask |= 1 << c;
    }
    if (mask === 0 || mask === 255) continue;
    let sx = 0, sy = 0, sz = 0, count = 0;
    for (const [a, b] of CUBE_EDGES) {
      const ina = (mask >> a) & 1, inb = (mask >> b) & 1;
      if (ina === inb) continue;
      const t = (level - v[a]) / (v[b] - v[a]);
      sx += (a & 1) + t * ((b & 1) - (a & 1));
      sy += ((a >> 1) & 1) + t * (((b >> 1) & 1) - ((a >> 1) & 1));
      sz += ((a >> 2) & 1) + t * (((b >> 2) & 1) - ((a >> 2) & 1));
      count++;
    }
    cellVertex[(k * cy + j) * cx + i] = pos.length / 3;
    pos.push(origin[0] + (i + sx / count) * spacing, origin[1] + (j + sy / count) * spacing, origin[2] + (k + sz / count) * spacing);
  }

  const idx: number[] = [];
  const cell = (i: number, j: number, k: number) => cellVertex[(k * cy + j) * cx + i];
  const quad = (a: number, b: number, c: number, d: number, flip: boolean) => {
    if (flip) idx.push(a, c, b, a, d, c);
    else idx.push(a, b, c, a, c, d);
  };
  // x edges: node (i,j,k)→(i+1,j,k), shared by cells (i, j−1..j, k−1..k)
  for (let k = 1; k < cz; k++) for (let j = 1; j < cy; j++) for (let i = 0; i < cx; i++) {
    const a = at(i, j, k) > level, b = at(i + 1, j, k) > level;
    if (a !== b) quad(cell(i, j - 1, k - 1), cell(i, j, k - 1), cell(i, j, k), cell(i, j - 1, k), a);
  }
  // y edges: node (i,j,k)→(i,j+1,k), shared by cells (i−1..i, j, k−1..k)
  for (let k = 1; k < cz; k++) for (let j = 0; j < cy; j++) for (let i = 1; i < cx; i++) {
    const a = at(i, j, k) > level, b = at(i, j + 1, k) > level;
    if (a !== b) quad(cell(i - 1, j, k - 1), cell(i - 1, j, k), cell(i, j, k), cell(i, j, k - 1), a);
  }
  // z edges: node (i,j,k)→(i,j,k+1), shared by cells (i−1..i, j−1..j, k)
  for (let k = 0; k < cz; k++) for (let j = 1; j < cy; j++) for (let i = 1; i < cx; i++) {
    const a = at(i, j, k) > level, b = at(i, j, k + 1) > level;
    if (a !== b) quad(cell(i - 1, j - 1, k), cell(i, j - 1, k), cell(i, j, k), cell(i - 1, j, k), a);
  }
  return { positions: Float32Array.from(pos), indices: Uint32Array.from(idx) };
}

// The 12 edges of a cube whose corners are numbered by bits (x = bit 0, y = bit 1, z = bit 2).
const CUBE_EDGES: [number, number][] = [
  [0, 1], [2, 3], [4, 5], [6, 7],
  [0, 2], [1, 3], [4, 6], [5, 7],
  [0, 4], [1, 5], [2, 6], [3, 7],
];
