// Axon–axon competition for target space: terminals on one target sheet repel each other
// within a radius r, so crowding costs energy and terminals spread over the space their cues
// allow. The energy of terminal i is a smoothed local density
//     C_i(x) = γ Σ_{j ≠ i, d_ij < r} (1 − d_ij / r)²,
// with d_ij the distance to terminal j; its force is
//     −∇C_i = γ Σ (2 / r)(1 − d_ij / r) (x − x_j) / d_ij.
// Koulakov & Tsigankov (BMC Neurosci. 5, 2004) enforce competition by letting terminals only
// exchange places on a lattice; this soft pair form of the same idea is our choice, so that
// terminals can sit anywhere on the sheet. Neighbours come from a cell list rebuilt once per
// step (engine/index/pointGrid.ts): cost per terminal depends on how many neighbours it has,
// not on how many terminals there are.
import { buildPointGrid, pointsWithin, type PointGrid, type PointGridBounds } from '../../index/pointGrid.ts';
import type { Sheet } from '../../geometry/regions.ts';

/** (1 − d/r)² for d < r, else 0 */
export function pairEnergy(d: number, r: number): number {
  if (d >= r) return 0;
  const q = 1 - d / r;
  return q * q;
}

/** Terminals of one target sheet and their neighbour grid. */
export class TerminalCompetition {
  readonly sheet: Sheet;
  /** terminals on the sheet at the last rebuild: positions xyz and axon ids */
  count = 0;
  private xyz: Float64Array;
  private ids: Int32Array;
  private grid: PointGrid | undefined;
  private readonly bounds: PointGridBounds;
  private readonly cellSize: number;
  // visitor state: one visitor made once, so queries allocate nothing
  private self = -1;
  private qx = 0; private qy = 0; private qz = 0;
  private r = 1;
  private acc = 0;
  private fx = 0; private fy = 0; private fz = 0;
  /** 0: density sum, 1: repulsion sum, 2: collect neighbours */
  private mode: 0 | 1 | 2 = 0;
  private picks = new Int32Array(64);
  private picked = 0;
  private readonly visit: (index: number, d: number) => void;

  constructor(sheet: Sheet, cellSize: number, capacity: number) {
    this.sheet = sheet;
    this.cellSize = cellSize;
    this.xyz = new Float64Array(3 * Math.max(1, capacity));
    this.ids = new Int32Array(Math.max(1, capacity));
    this.bounds = sheetBounds(sheet);
    this.visit = (index, d) => {
      if (this.ids[index] === this.self) return;
      if (this.mode === 0) {
        this.acc += pairEnergy(d, this.r);
      } else if (this.mode === 2) {
        if (this.picked === this.picks.length) {
          const grown = new Int32Array(2 * this.picks.length);
          grown.set(this.picks);
          this.picks = grown;
        }
        this.picks[this.picked++] = this.ids[index];
      } else if (d < this.r && d > 1e-9) {
        const k = 3 * index;
        const f = ((2 / this.r) * (1 - d / this.r)) / d;
        this.fx += f * (this.qx - this.xyz[k]);
        this.fy += f * (this.qy - this.xyz[k + 1]);
        this.fz += f * (this.qz - this.xyz[k + 2]);
      }
    };
  }

  /** Starts a rebuild: call add() for every terminal on the sheet, then commit(). */
  clear(): void {
    this.count = 0;
  }

  add(axon: number, x: number, y: number, z: number): void {
    if (this.count === this.ids.length) this.grow();
    const k = this.count++;
    this.ids[k] = axon;
    this.xyz[3 * k] = x; this.xyz[3 * k + 1] = y; this.xyz[3 * k + 2] = z;
  }

  commit(): void {
    this.grid = buildPointGrid(this.xyz, this.count, this.cellSize, this.bounds, this.grid);
  }

  /** C_i(x)/γ: Σ (1 − d/r)² over the other terminals within r of (x, y, z). */
  density(self: number, x: number, y: number, z: number, r: number): number {
    if (!this.grid || this.count === 0) return 0;
    this.self = self; this.r = r; this.mode = 0; this.acc = 0;
    pointsWithin(this.grid, x, y, z, r, this.visit);
    return this.acc;
  }

  /** [C_i(p) − C_i(q)]/γ for a move from q to p. Two queries of radius r: one of radius
   *  r + |p − q| around q would cover both but, for moves longer than r, visit many more. */
  densityChange(self: number, qx: number, qy: number, qz: number, px: number, py: number, pz: number, r: number): number {
    return this.density(self, px, py, pz, r) - this.density(self, qx, qy, qz, r);
  }

  /** −∇C_i/γ at (x, y, z) into out[0..2], µm⁻¹. */
  repulsion(self: number, x: number, y: number, z: number, r: number, out: Float64Array): void {
    this.fx = this.fy = this.fz = 0;
    if (this.grid && this.count > 0) {
      this.self = self; this.r = r; this.mode = 1;
      this.qx = x; this.qy = y; this.qz = z;
      pointsWithin(this.grid, x, y, z, r, this.visit);
    }
    out[0] = this.fx; out[1] = this.fy; out[2] = this.fz;
  }

  /** A terminal other than `self` within r of (x, y, z), chosen uniformly (its axon id), or −1. */
  randomNeighbour(self: number, x: number, y: number, z: number, r: number, rng: () => number): number {
    if (!this.grid || this.count === 0) return -1;
    this.self = self; this.r = r; this.mode = 2; this.picked = 0;
    pointsWithin(this.grid, x, y, z, r, this.visit);
    return this.picked ? this.picks[Math.floor(rng() * this.picked)] : -1;
  }

  private grow(): void {
    const ids = new Int32Array(2 * this.ids.length);
    ids.set(this.ids);
    const xyz = new Float64Array(6 * this.ids.length);
    xyz.set(this.xyz);
    this.ids = ids;
    this.xyz = xyz;
  }
}

/** Twice the mean spacing of n terminals spread evenly over the sheet: 2·√(area / n). */
export function defaultCompetitionRadius(sheet: Sheet, n: number): number {
  const U = sheet.U, V = sheet.V;
  const cx = U[1] * V[2] - U[2] * V[1], cy = U[2] * V[0] - U[0] * V[2], cz = U[0] * V[1] - U[1] * V[0];
  const area = Math.sqrt(cx * cx + cy * cy + cz * cz);
  return 2 * Math.sqrt(area / Math.max(1, n));
}

function sheetBounds(s: Sheet): PointGridBounds {
  const b = { minX: Infinity, minY: Infinity, minZ: Infinity, maxX: -Infinity, maxY: -Infinity, maxZ: -Infinity };
  const p = new Float64Array(3);
  for (const [u, v] of [[0, 0], [1, 0], [0, 1], [1, 1]]) {
    s.point(u, v, 0, p);
    b.minX = Math.min(b.minX, p[0]); b.maxX = Math.max(b.maxX, p[0]);
    b.minY = Math.min(b.minY, p[1]); b.maxY = Math.max(b.maxY, p[1]);
    b.minZ = Math.min(b.minZ, p[2]); b.maxZ = Math.max(b.maxZ, p[2]);
  }
  return b;
}
