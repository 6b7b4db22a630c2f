// The run store's on-disk format: file names, the manifest's shape and the status codes.
// This module is pure (no Node, no DOM) so the engine that writes a run and the viewer that
// reads it share one definition. Readers and writers live beside it (npy.ts, csv.ts,
// runWriter.ts for Node, runReader.ts for any environment with a fetch-like loader).

/** Bumped whenever a reader of the previous version would misread a new run. */
export const RUN_FORMAT_VERSION = 1;

export const RUN_FILES = {
  manifest: 'run.json',
  frames: 'frames.npy', // float32 [frames, axons, 3], µm
  axons: 'axons.csv', // one row per axon
  swc: 'axons.swc', // optional, SWC standard, one tree per axon
  fieldsDir: 'fields', // fields/<cue>.npy, float32 grids for display
} as const;

/** What an axon was doing when the run ended. The numeric code is what the engine stores in
 *  its typed arrays; the name is what axons.csv and run.json carry. */
export const AXON_STATUS = ['growing', 'reached', 'stalled', 'exited', 'max-steps', 'interrupted', 'waiting', 'terminated'] as const;
export type AxonStatus = (typeof AXON_STATUS)[number];
export const STATUS_CODE: Record<AxonStatus, number> = Object.fromEntries(
  AXON_STATUS.map((s, i) => [s, i]),
) as Record<AxonStatus, number>;

/** How many of axons [from, to) ended with each status (run.json statusCounts; metrics.growth per population). */
export function countStatuses(status: Uint8Array, from = 0, to = status.length): Partial<Record<AxonStatus, number>> {
  const counts: Partial<Record<AxonStatus, number>> = {};
  for (let i = from; i < to; i++) {
    const s = AXON_STATUS[status[i]];
    counts[s] = (counts[s] ?? 0) + 1;
  }
  return counts;
}

/** A display grid written to fields/<name>.npy.
 *  space "volume": array shape [nz, ny, nx]; node (i, j, k) sits at origin + (i, j, k)·spacing µm.
 *  space "sheet": array shape [nv, nu] over a sheet region's own (u, v) ∈ [0, 1]²;
 *  node (a, b) is at u = a/(nu−1), v = b/(nv−1). */
export interface FieldGridInfo {
  cue: string;
  file: string; // relative to the run directory, e.g. "fields/attractant-1.npy"
  space: 'volume' | 'sheet';
  region?: string; // the sheet, for space "sheet"
  shape: number[];
  origin?: [number, number, number];
  spacing?: number;
  min: number;
  max: number;
  /** Present on the field named after a border cue: its values are a − b, the difference of the
   *  cue's two species (a = species[0]), positive on a's side; the border surface, where the two
   *  are equal, is the zero isosurface of this grid. The species have their own grids under
   *  their own names. `solve` reports the coupled solve (engine/fields/borderSolver.ts). */
  border?: {
    species: [string, string];
    solve: { iterations: number; linearIterations: number; gap: number; converged: boolean; unique: boolean; method: string };
  };
}

export interface PopulationInfo {
  name: string;
  firstAxon: number; // axons [firstAxon, firstAxon + count) belong to it
  count: number;
  source: string; // region name
  target?: string; // region name
  receptors: string[];
  startStep: number;
}

/** run.json */
export interface RunManifest {
  format: 'axonloom-run';
  formatVersion: number;
  engineVersion: string;
  status: 'complete' | 'interrupted';
  name: string; // scene name (run directory default)
  variant?: string;
  edits: unknown[]; // perturbations applied, as given
  seed: number;
  createdAt: string; // ISO time
  wallTimeS: number;
  axons: number;
  stepsRun: number; // steps actually simulated
  stepsPlanned: number;
  dtHours: number;
  frameEvery: number; // a frame every this many steps
  frames: number; // frames in frames.npy
  frameTimesH: number[]; // time in hours of each frame
  volume: { size: [number, number, number]; voxel: number };
  populations: PopulationInfo[];
  fields: FieldGridInfo[];
  statusCounts: Partial<Record<AxonStatus, number>>;
  metrics: Record<string, unknown>;
  scene: unknown; // the resolved scene (defaults filled, edits applied)
}

/** Whether a directory entry under a runs folder can be a run. Runs being written
 *  (".<name>.partial-…") and runs set aside while being replaced (".<name>.replaced-…") are
 *  dot-named so that they never look like one (see runDir.ts); every listing of runs skips them. */
export function isRunDirName(name: string): boolean {
  return name.length > 0 && !name.startsWith('.');
}
