// The one interface every cue kind implements. A field is built once per run (analytic kinds
// just keep their parameters; grid kinds solve first) and then sampled in the step loop.
import type { Cue, Scene } from '../scene/schema.ts';
import type { CompiledRegion } from '../geometry/regions.ts';
import type { GridSpec } from './gridSolver.ts';

export interface CueField {
  readonly name: string;
  readonly kind: Cue['kind'];
  /** "diffusible" fields are sensed everywhere; "contact" ones only near their region */
  readonly sensing: 'diffusible' | 'contact';
  /** Value at (x, y, z) µm, in the scene's concentration units; writes ∂c/∂x, ∂c/∂y, ∂c/∂z
   *  into grad[0..2]. Must not allocate: it runs for every cone, receptor and step. */
  sample(x: number, y: number, z: number, grad: Float64Array): number;
  /** A grid for display and the run store. */
  displayGrid(ctx: BuildContext): DisplayGrid;
}

export type DisplayGrid =
  | { space: 'volume'; grid: GridSpec; origin: [number, number, number]; values: Float32Array }
  | { space: 'sheet'; region: string; nu: number; nv: number; values: Float32Array };

export interface BuildContext {
  scene: Scene;
  regions: Map<string, CompiledRegion>;
  /** the volume's solve grid: node-centred, spacing = volume.voxel */
  grid: GridSpec;
  onProgress?: (message: string, fraction: number) => void;
}

/** The node-centred grid over the volume: round(L/h) + 1 nodes per axis. */
export function volumeGrid(scene: Scene): GridSpec {
  const h = scene.volume.voxel;
  const [lx, ly, lz] = scene.volume.size;
  return { nx: Math.round(lx / h) + 1, ny: Math.round(ly / h) + 1, nz: Math.round(lz / h) + 1, h };
}

/** Display grids are capped near 96 nodes a side so a run directory stays small; solved fields
 *  keep their own resolution when it is already coarser. */
export function displaySpec(grid: GridSpec, maxSide = 96): GridSpec {
  const side = Math.max(grid.nx, grid.ny, grid.nz);
  if (side <= maxSide) return grid;
  const f = Math.ceil((side - 1) / (maxSide - 1));
  return { nx: Math.floor((grid.nx - 1) / f) + 1, ny: Math.floor((grid.ny - 1) / f) + 1, nz: Math.floor((grid.nz - 1) / f) + 1, h: grid.h * f };
}

/** Samples any field onto a volume grid (node (i, j, k) at (i, j, k)·h). */
export function sampleOnVolume(field: CueField, grid: GridSpec): DisplayGrid {
  const values = new Float32Array(grid.nx * grid.ny * grid.nz);
  const grad = new Float64Array(3);
  let n = 0;
  for (let k = 0; k < grid.nz; k++)
    for (let j = 0; j < grid.ny; j++)
      for (let i = 0; i < grid.nx; i++) values[n++] = field.sample(i * grid.h, j * grid.h, k * grid.h, grad);
  return { space: 'volume', grid, origin: [0, 0, 0], values };
}
