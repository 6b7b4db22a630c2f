// A ligand lining a guidance corridor: the cells of a tube express it at a level graded along
// the tube (a profile over the axial coordinate u ∈ [0, 1], 0 at `from`, 1 at `to`), sensed by
// contact. Inside the tube the level depends on u alone, so the gradient runs along the
// corridor; over `contact` µm beyond the wall it fades linearly to zero,
//
//     c(x) = scale · P(u) · w(d),   w = 1 (d ≤ 0),  1 − d/contact (0 < d < contact),  0 beyond,
//
// with d the distance outside the wall, so a cone straying over the rim is drawn back in,
// while one inside is steered along the corridor rather than bounced between its walls.
// ∇c = scale · (P′(u) w ∇u + P(u) w′(d) ∇d), ∇u = axis/|axis|² (0 past the ends), ∇d the
// outward wall normal (a contact-cue model of this project, common practice, no source).
import type { LiningCue } from '../scene/schema.ts';
import type { CueField, BuildContext, DisplayGrid } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { profileLevel, profileSlope } from './profile.ts';
import type { Tube } from '../geometry/tube.ts';

export function buildLiningField(cue: LiningCue, ctx: BuildContext): CueField {
  return new LiningField(cue, ctx.regions.get(cue.region) as Tube, ctx);
}

class LiningField implements CueField {
  readonly kind = 'lining' as const;
  readonly sensing = 'contact' as const;
  readonly name: string;
  private readonly n = new Float64Array(3);
  private readonly gu: Float64Array; // ∇u inside the axial range

  constructor(private readonly cue: LiningCue, private readonly tube: Tube, private readonly ctx: BuildContext) {
    this.name = cue.name;
    const l2 = tube.length * tube.length;
    this.gu = l2 > 0 ? Float64Array.from(tube.axis, (a) => a / l2) : new Float64Array(3);
  }

  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const c = this.cue, n = this.n;
    const d = this.tube.distance(x, y, z, n);
    if (d >= c.contact || c.scale === 0) {
      grad[0] = grad[1] = grad[2] = 0;
      return 0;
    }
    const u = this.tube.axisParameter(x, y, z);
    const level = c.scale * profileLevel(c.profile, u, 0);
    // the axial gradient vanishes beyond the ends, where u is clamped
    const slope = u > 0 && u < 1 ? c.scale * profileSlope(c.profile, u, 0) : 0;
    const w = d <= 0 ? 1 : 1 - d / c.contact;
    const dw = d <= 0 ? 0 : -1 / c.contact;
    const gu = this.gu;
    grad[0] = slope * w * gu[0] + level * dw * n[0];
    grad[1] = slope * w * gu[1] + level * dw * n[1];
    grad[2] = slope * w * gu[2] + level * dw * n[2];
    return level * w;
  }

  displayGrid(): DisplayGrid {
    return sampleOnVolume(this, displaySpec(this.ctx.grid));
  }
}
