// A secreted point source. Analytic by default; `solve: "grid"` hands it to the grid solver so
// walls (absorbing or reflecting) shape it like any region source.
import type { PointCue } from '../scene/schema.ts';
import type { CueField, BuildContext, DisplayGrid } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { solvedField } from './solvedField.ts';
import { spreadPointSource } from './gridSolver.ts';

/** Steady state of ∂c/∂t = D∇²c − kc + Qδ(x − x₀) in an infinite medium:
 *    c(r) = Q / (4πDr) · exp(−r/λ),  λ = √(D/k)
 *  (Crank, The Mathematics of Diffusion, 2nd ed. 1975; Berg, Random Walks in Biology, 1983).
 *  Inside the source radius a the value is held at c(a). */
export function pointConcentration(Q: number, D: number, k: number, r: number, a: number): number {
  const rr = r < a ? a : r;
  return (Q / (4 * Math.PI * D * rr)) * Math.exp(-rr * Math.sqrt(k / D));
}

/** dc/dr of the same formula: −c·(1/r + 1/λ) outside a, 0 inside. */
export function pointRadialSlope(Q: number, D: number, k: number, r: number, a: number): number {
  if (r < a) return 0;
  return -pointConcentration(Q, D, k, r, a) * (1 / r + Math.sqrt(k / D));
}

export function buildPointField(cue: PointCue, ctx: BuildContext): CueField {
  if (cue.solve === 'grid') {
    const source = spreadPointSource(ctx.grid, cue.position, cue.rate * cue.scale);
    return solvedField(cue, ctx, source, cue.boundary ?? 'absorbing');
  }
  return new AnalyticPointField(cue, ctx);
}

class AnalyticPointField implements CueField {
  readonly kind = 'point' as const;
  readonly sensing = 'diffusible' as const;
  readonly name: string;
  private readonly x0: number;
  private readonly y0: number;
  private readonly z0: number;
  private readonly amp: number; // Q·scale / (4πD)
  private readonly invLambda: number;
  private readonly a: number;
  private readonly ctx: BuildContext;

  constructor(cue: PointCue, ctx: BuildContext) {
    this.name = cue.name;
    [this.x0, this.y0, this.z0] = cue.position;
    this.amp = (cue.rate * cue.scale) / (4 * Math.PI * cue.diffusion);
    this.invLambda = Math.sqrt(cue.decay / cue.diffusion);
    this.a = cue.radius ?? ctx.scene.volume.voxel;
    this.ctx = ctx;
  }

  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const dx = x - this.x0, dy = y - this.y0, dz = z - this.z0;
    const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
    if (r < this.a) {
      grad[0] = grad[1] = grad[2] = 0;
      return (this.amp / this.a) * Math.exp(-this.a * this.invLambda);
    }
    // same formula as pointConcentration, inlined: this is the hottest call in the engine
    const c = (this.amp / r) * Math.exp(-r * this.invLambda);
    const s = (-c * (1 / r + this.invLambda)) / r; // (dc/dr) / r, times (dx, dy, dz) gives ∇c
    grad[0] = s * dx; grad[1] = s * dy; grad[2] = s * dz;
    return c;
  }

  displayGrid(): DisplayGrid {
    return sampleOnVolume(this, displaySpec(this.ctx.grid));
  }
}
