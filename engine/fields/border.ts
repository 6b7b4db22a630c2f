// A border cue: two morphogens produced from opposite sides, each repressing the other's
// production, solved together to steady state (borderSolver.ts). One cue yields three fields:
//   - one per species, under the species' own name (receptors bind it, probe samples it);
//   - the cue's own name: the difference a − b, zero on the border, so the border surface is
//     its zero isosurface (exported as fields/<cue>.npy with role "border", see runFormat.ts).
//
// Scaling: the equations are non-linear, so multiplying a solved field would leave the border
// where it was. A border cue's `scale` and each species' `scale` multiply *production* inside
// the coupled solve instead (scale edits naming the cue or a species edit these); a knockout
// of a species stops its production, a knockout of the cue stops both.
//
// After solving, the builder binds every domain region ("where X dominates", "where X is above
// t") that names one of its species, so those regions can be targets from then on.
import type { BorderCue, BorderSpecies, Region } from '../scene/schema.ts';
import type { CueField, BuildContext, DisplayGrid } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { SolvedField } from './solvedField.ts';
import { GridSampler } from './gridSampler.ts';
import { solveBorder, type BorderSolution } from './borderSolver.ts';
import { Domain } from '../geometry/domains.ts';
import type { CompiledRegion } from '../geometry/regions.ts';

export function buildBorderFields(cue: BorderCue, ctx: BuildContext): CueField[] {
  const [sa, sb] = cue.species;
  const solution = solveBorder({
    grid: ctx.grid,
    boundary: cue.boundary,
    species: [speciesProblem(cue, sa, ctx), speciesProblem(cue, sb, ctx)],
    tolerance: cue.tolerance,
    maxIterations: cue.maxIterations,
    onProgress: (it, gap) => ctx.onProgress?.(`solving border ${cue.name}: iteration ${it}, bracket ${gap.toExponential(1)}`, 0),
  });
  if (!solution.unique) {
    ctx.onProgress?.(`border ${cue.name}: more than one steady state; using the one reached from zero (morphogens switched on together)`, 0);
  }
  const a = new SolvedField(sa.name, 'border', ctx, solution.a, solution.linearIterations, solution.gap);
  const b = new SolvedField(sb.name, 'border', ctx, solution.b, solution.linearIterations, solution.gap);
  bindDomains(ctx.regions, { [sa.name]: [a, b], [sb.name]: [b, a] });
  return [a, b, new BorderDifference(cue.name, [sa.name, sb.name], solution, ctx)];
}

/** The cue's own field: a − b, positive on a's side, zero on the border. */
export class BorderDifference implements CueField {
  readonly kind = 'border' as const;
  readonly sensing = 'diffusible' as const;
  /** the solve's outcome, for run.json */
  readonly stats: { iterations: number; linearIterations: number; gap: number; converged: boolean; unique: boolean; method: string };
  private readonly sa: GridSampler;
  private readonly sb: GridSampler;
  private readonly gb = new Float64Array(3);
  readonly values: Float64Array;

  constructor(
    readonly name: string,
    readonly species: [string, string],
    solution: BorderSolution,
    private readonly ctx: BuildContext,
  ) {
    const { a, b, iterations, linearIterations, gap, converged, unique, method } = solution;
    this.stats = { iterations, linearIterations, gap, converged, unique, method };
    this.values = new Float64Array(a.length);
    for (let i = 0; i < a.length; i++) this.values[i] = a[i] - b[i];
    this.sa = new GridSampler(ctx.grid, a);
    this.sb = new GridSampler(ctx.grid, b);
  }

  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const gb = this.gb;
    const va = this.sa.sample(x, y, z, grad);
    const vb = this.sb.sample(x, y, z, gb);
    grad[0] -= gb[0]; grad[1] -= gb[1]; grad[2] -= gb[2];
    return va - vb;
  }

  displayGrid(): DisplayGrid {
    const spec = displaySpec(this.ctx.grid);
    if (spec === this.ctx.grid) return { space: 'volume', grid: spec, origin: [0, 0, 0], values: Float32Array.from(this.values) };
    return sampleOnVolume(this, spec);
  }
}

// ---------------------------------------------------------------------------------------------

/** s(x) = rate · species scale · cue scale on the nodes inside the species' region. */
function speciesProblem(cue: BorderCue, sp: BorderSpecies, ctx: BuildContext) {
  const region = ctx.regions.get(sp.region)!;
  const { nx, ny, nz, h } = ctx.grid;
  const production = new Float64Array(nx * ny * nz);
  const rate = sp.rate * sp.scale * cue.scale;
  let inside = 0;
  for (let k = 0, n = 0; k < nz; k++)
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++, n++)
        if (region.contains(i * h, j * h, k * h)) {
          production[n] = rate;
          inside++;
        }
  if (inside === 0) {
    // thinner than a voxel: produce on the node nearest the region's centre rather than nowhere
    const c = centreOf(ctx.scene.regions.find((r) => r.name === sp.region)!);
    const at = (v: number, m: number) => Math.min(m - 1, Math.max(0, Math.round(v / h)));
    production[at(c[0], nx) + nx * (at(c[1], ny) + ny * at(c[2], nz))] = rate;
  }
  return { diffusion: sp.diffusion, decay: sp.decay, production, repression: sp.repression, hill: sp.hill };
}

function centreOf(r: Region): [number, number, number] {
  switch (r.shape) {
    case 'box': return [(r.min[0] + r.max[0]) / 2, (r.min[1] + r.max[1]) / 2, (r.min[2] + r.max[2]) / 2];
    case 'ellipsoid': return r.center;
    case 'tube': return [(r.from[0] + r.to[0]) / 2, (r.from[1] + r.to[1]) / 2, (r.from[2] + r.to[2]) / 2];
    default: throw new Error(`internal: a ${r.shape} region cannot produce a border species (load.ts rejects it)`);
  }
}

/** Binds each domain region naming one of these species to [that species, its partner]. */
function bindDomains(regions: Map<string, CompiledRegion>, pairs: Record<string, [CueField, CueField]>): void {
  for (const r of regions.values()) {
    if (!(r instanceof Domain)) continue;
    const pair = pairs[r.spec.species];
    if (!pair) continue;
    const within = r.spec.within !== undefined ? regions.get(r.spec.within) ?? null : null;
    if (within instanceof Domain) throw new Error(`internal: domain "${r.name}" is within another domain (load.ts rejects it)`);
    r.bind(pair[0], pair[1], within);
  }
}
