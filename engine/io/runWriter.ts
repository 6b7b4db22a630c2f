// Writes a run directory while the engine runs (Node only). Frames stream to frames.npy as they
// are made; everything else is written at the end; the directory becomes visible under its
// final name only when whole (see runDir.ts). An interrupted run is still written whole, with
// status "interrupted" in run.json and on every axon that was still growing.
import type { World, SimResult } from '../sim/simulate.ts';
import type { Edit } from '../scene/schema.ts';
import { RunDirectory } from './runDir.ts';
import { NpyStreamWriter } from './npyFileWriter.ts';
import { encodeNpy } from './npy.ts';
import { toCsv, formatFloat32, type CsvCell } from './csv.ts';
import { axonsToSwc, type AxonPath } from './swc.ts';
import { RUN_FILES, RUN_FORMAT_VERSION, AXON_STATUS, countStatuses, type RunManifest, type FieldGridInfo } from './runFormat.ts';
import { ENGINE_VERSION } from '../version.ts';
import { BorderDifference } from '../fields/border.ts';

export interface RecorderOptions {
  outDir: string;
  swc?: boolean;
}

export interface RunExtras {
  variant?: string;
  edits: Edit[];
  wallTimeS: number;
  metrics: Record<string, unknown>;
  /** extra axons.csv columns (map metrics and others), one value per axon */
  axonColumns?: { name: string; values: ArrayLike<number | string> }[];
}

export class RunRecorder {
  private readonly dir: RunDirectory;
  private readonly frames: NpyStreamWriter;
  private readonly swcFrames: Float32Array[] | null;
  private readonly world: World;

  constructor(world: World, opts: RecorderOptions) {
    this.world = world;
    this.dir = RunDirectory.begin(opts.outDir);
    const g = world.scene.growth;
    const maxFrames = Math.floor(world.steps / g.frameEvery) + 2;
    this.frames = new NpyStreamWriter(this.dir.path(RUN_FILES.frames), '<f4', [world.cones.count, 3], maxFrames);
    this.swcFrames = opts.swc ? [] : null;
  }

  get finalDir(): string {
    return this.dir.finalDir;
  }

  /** SimHooks.onFrame: append one [axons, 3] block. */
  onFrame = (_frame: number, _step: number, positions: Float32Array): void => {
    this.frames.append(positions);
    this.swcFrames?.push(positions.slice());
  };

  /** Writes fields, axons.csv, run.json (and axons.swc) and moves the run into place. */
  finish(result: SimResult, extras: RunExtras): RunManifest {
    try {
      const frames = this.frames.close();
      const { world } = this;
      const { scene, cones } = world;
      const fields = this.writeFields();
      this.dir.writeText(RUN_FILES.axons, this.axonsCsv(extras.axonColumns ?? []));
      if (this.swcFrames) this.dir.writeText(RUN_FILES.swc, this.swc());

      const statusCounts = countStatuses(cones.status);
      const manifest: RunManifest = {
        format: 'axonloom-run',
        formatVersion: RUN_FORMAT_VERSION,
        engineVersion: ENGINE_VERSION,
        status: result.interrupted ? 'interrupted' : 'complete',
        name: scene.name,
        variant: extras.variant,
        edits: extras.edits,
        seed: scene.seed,
        createdAt: new Date().toISOString(),
        wallTimeS: extras.wallTimeS,
        axons: cones.count,
        stepsRun: result.stepsRun,
        stepsPlanned: world.steps,
        dtHours: scene.growth.dt,
        frameEvery: scene.growth.frameEvery,
        frames,
        frameTimesH: result.frameSteps.map((s) => s * scene.growth.dt),
        volume: { size: [...scene.volume.size], voxel: scene.volume.voxel },
        populations: world.populations.map((p) => ({
          name: p.name, firstAxon: p.first, count: p.count, source: p.spec.source, target: p.spec.target,
          receptors: p.receptorNames, startStep: p.startStep,
        })),
        fields,
        statusCounts,
        metrics: extras.metrics,
        scene,
      };
      this.dir.writeJson(RUN_FILES.manifest, manifest);
      this.dir.commit();
      return manifest;
    } catch (e) {
      this.abort();
      throw e;
    }
  }

  abort(): void {
    try {
      this.frames.close();
    } catch {
      /* already closed */
    }
    this.dir.abort();
  }

  private writeFields(): FieldGridInfo[] {
    const { fields, fieldContext } = this.world;
    return fields.map((f) => {
      const grid = f.displayGrid(fieldContext);
      const file = `${RUN_FILES.fieldsDir}/${f.name}.npy`;
      let min = Infinity, max = -Infinity;
      for (let i = 0; i < grid.values.length; i++) {
        const v = grid.values[i];
        if (v < min) min = v;
        if (v > max) max = v;
      }
      if (grid.space === 'volume') {
        const shape = [grid.grid.nz, grid.grid.ny, grid.grid.nx];
        this.dir.writeBinary(file, encodeNpy(grid.values, shape));
        const border = f instanceof BorderDifference ? { border: { species: f.species, solve: f.stats } } : {};
        return { cue: f.name, file, space: 'volume', shape, origin: grid.origin, spacing: grid.grid.h, min, max, ...border };
      }
      const shape = [grid.nv, grid.nu];
      this.dir.writeBinary(file, encodeNpy(grid.values, shape));
      return { cue: f.name, file, space: 'sheet', region: grid.region, shape, min, max };
    });
  }

  private axonsCsv(extra: NonNullable<RunExtras['axonColumns']>): string {
    const { cones, populations } = this.world;
    const receptorNames = [...new Set(populations.flatMap((p) => p.receptorNames))];
    const header = [
      'id', 'population', 'source_u', 'source_v', ...receptorNames.map((r) => `receptor_${r}`), 'knockin',
      'start_step', 'end_x', 'end_y', 'end_z', 'status', 'steps', 'path_length_um', ...extra.map((c) => c.name),
    ];
    const rows: CsvCell[][] = [];
    for (const pop of populations) {
      const slot = receptorNames.map((r) => pop.receptorNames.indexOf(r));
      for (let i = pop.first; i < pop.first + pop.count; i++) {
        const row: CsvCell[] = [i, pop.name, round6(cones.sourceU[i]), round6(cones.sourceV[i])];
        for (const k of slot) row.push(k < 0 ? '' : round6(cones.receptorLevel[i * cones.receptorStride + k]));
        row.push(cones.knockin[i], pop.startStep,
          formatFloat32(cones.position[3 * i]), formatFloat32(cones.position[3 * i + 1]), formatFloat32(cones.position[3 * i + 2]),
          AXON_STATUS[cones.status[i]], cones.steps[i], round3(cones.pathLength[i]));
        for (const c of extra) row.push(c.values[i]);
        rows.push(row);
      }
    }
    return toCsv(header, rows, { eol: '\n' });
  }

  private swc(): string {
    const frames = this.swcFrames!;
    const paths: AxonPath[] = [];
    // one tree per axon; frames where the axon did not move (waiting, stopped) are dropped
    for (let a = 0; a < this.world.cones.count; a++) {
      const points = new Float32Array(3 * frames.length);
      let count = 0;
      for (const fr of frames) {
        const x = fr[3 * a], y = fr[3 * a + 1], z = fr[3 * a + 2];
        if (count > 0 && x === points[3 * count - 3] && y === points[3 * count - 2] && z === points[3 * count - 1]) continue;
        points[3 * count] = x; points[3 * count + 1] = y; points[3 * count + 2] = z;
        count++;
      }
      paths.push({ axonId: a, points, count });
    }
    return axonsToSwc(paths, 0.5, [`axonloom ${ENGINE_VERSION} run of scene "${this.world.scene.name}"`, 'positions in µm']);
  }
}

function round6(v: number): number {
  return Math.round(v * 1e6) / 1e6;
}
function round3(v: number): number {
  return Math.round(v * 1e3) / 1e3;
}
