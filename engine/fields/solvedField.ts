// A cue whose steady state is solved on the volume grid (region sources, grid-solved points).
import type { Cue } from '../scene/schema.ts';
import type { CueField, BuildContext, DisplayGrid } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { solveSteadyReactionDiffusion, type Boundary } from './gridSolver.ts';
import { GridSampler } from './gridSampler.ts';

export function solvedField(
  cue: Extract<Cue, { diffusion: number }>, ctx: BuildContext, source: Float64Array, boundary: Boundary,
): CueField {
  const solution = solveSteadyReactionDiffusion({
    grid: ctx.grid,
    diffusion: cue.diffusion,
    decay: cue.decay,
    source,
    boundary,
    onProgress: (it, res) => ctx.onProgress?.(`solving ${cue.name}: iteration ${it}, residual ${res.toExponential(1)}`, 0),
  });
  return new SolvedField(cue.name, cue.kind, ctx, solution.c, solution.iterations, solution.relResidual);
}

export class SolvedField implements CueField {
  readonly sensing = 'diffusible' as const;
  private readonly sampler: GridSampler;
  constructor(
    readonly name: string,
    readonly kind: Cue['kind'],
    private readonly ctx: BuildContext,
    readonly values: Float64Array,
    readonly iterations: number,
    readonly relResidual: number,
  ) {
    this.sampler = new GridSampler(ctx.grid, values);
  }

  /** trilinear value and gradient of the solved grid */
  sample(x: number, y: number, z: number, grad: Float64Array): number {
    return this.sampler.sample(x, y, z, grad);
  }

  displayGrid(): DisplayGrid {
    const spec = displaySpec(this.ctx.grid);
    if (spec === this.ctx.grid) return { space: 'volume', grid: spec, origin: [0, 0, 0], values: Float32Array.from(this.values) };
    return sampleOnVolume(this, spec);
  }
}
