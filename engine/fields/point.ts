// A secreted point source. Analytic by default; `solve: "grid"` hands it to the grid solver so
// walls (absorbing or reflecting) shape it like any region source.
import type { PointCue } from '../scene/schema.ts';
import type { CueField, BuildContext, DisplayGrid } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { solvedField } from './solvedField.ts';
import { addPointSource } from './gridSolver.ts';

export function buildPointField(cue: PointCue, ctx: BuildContext): CueField {
  if (cue.solve === 'grid') {
    const source = addPointSource(ctx.grid, cue.position, cue.rate * cue.scale);
    for (const e of cue.extraSources ?? []) addPointSource(ctx.grid, e.position, (e.rate ?? cue.rate) * cue.scale, source);
    return solvedField(cue, ctx, source, cue.boundary ?? 'absorbing');
  }
  return new AnalyticPointField(cue, ctx);
}

/** Steady state of ∂c/∂t = D∇²c − kc + Qδ(x − x₀) in an infinite medium:
 *    c(r) = Q / (4πDr) · exp(−r/λ),  λ = √(D/k),   ∇c = −c·(1/r + 1/λ)·r̂
 *  (Crank, The Mathematics of Diffusion, 2nd ed. 1975; Berg, Random Walks in Biology, 1983),
 *  held at c(a) inside the source radius a. The equation is linear, so sources superpose. */
class AnalyticPointField implements CueField {
  readonly kind = 'point' as const;
  readonly sensing = 'diffusible' as const;
  readonly name: string;
  /** per source: x, y, z, amplitude Q·scale/(4πD) */
  private readonly src: Float64Array;
  private readonly invLambda: number;
  private readonly a: number;
  private readonly ctx: BuildContext;

  constructor(cue: PointCue, ctx: BuildContext) {
    this.name = cue.name;
    const all = [{ position: cue.position, rate: cue.rate }, ...(cue.extraSources ?? [])];
    this.src = new Float64Array(4 * all.length);
    all.forEach((s, i) => {
      this.src.set(s.position, 4 * i);
      this.src[4 * i + 3] = ((s.rate ?? cue.rate) * cue.scale) / (4 * Math.PI * cue.diffusion);
    });
    this.invLambda = Math.sqrt(cue.decay / cue.diffusion);
    this.a = cue.radius ?? ctx.scene.volume.voxel;
    this.ctx = ctx;
  }

  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const src = this.src, a = this.a, il = this.invLambda;
    let c = 0, gx = 0, gy = 0, gz = 0;
    for (let o = 0; o < src.length; o += 4) {
      const dx = x - src[o], dy = y - src[o + 1], dz = z - src[o + 2], amp = src[o + 3];
      const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
      if (r < a) {
        c += (amp / a) * Math.exp(-a * il); // held at c(a), flat inside
        continue;
      }
      const ci = (amp / r) * Math.exp(-r * il);
      const s = (-ci * (1 / r + il)) / r; // (dc/dr)/r; times (dx, dy, dz) gives ∇c
      c += ci;
      gx += s * dx; gy += s * dy; gz += s * dz;
    }
    grad[0] = gx; grad[1] = gy; grad[2] = gz;
    return c;
  }

  displayGrid(): DisplayGrid {
    return sampleOnVolume(this, displaySpec(this.ctx.grid));
  }
}
