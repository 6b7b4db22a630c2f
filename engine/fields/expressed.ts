// A membrane-bound ligand expressed on a sheet as a profile over the sheet's own (u, v),
// sensed only by contact: within `contact` µm of the sheet's plane, over the sheet.
import type { ExpressedCue } from '../scene/schema.ts';
import type { CueField, DisplayGrid } from './field.ts';
import type { BuildContext } from './field.ts';
import type { Sheet } from '../geometry/regions.ts';
import { profileLevel, profileSlope } from './profile.ts';

export const SHEET_DISPLAY_NODES = 65;

export function buildExpressedField(cue: ExpressedCue, ctx: BuildContext): CueField {
  return new ExpressedField(cue, ctx.regions.get(cue.region) as Sheet);
}

class ExpressedField implements CueField {
  readonly kind = 'expressed' as const;
  readonly sensing = 'contact' as const;
  readonly name: string;
  private readonly uvw = new Float64Array(3);
  constructor(private readonly cue: ExpressedCue, private readonly sheet: Sheet) {
    this.name = cue.name;
  }

  /** level = scale·profile(u, v) on contact; ∇level = scale·(∂ℓ/∂u ∇u + ∂ℓ/∂v ∇v), the in-sheet
   *  gradient, with ∇u and ∇v the sheet's dual basis vectors. Zero off the sheet. */
  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const s = this.sheet, p = this.cue.profile, uvw = this.uvw;
    s.coords(x, y, z, uvw);
    const u = uvw[0], v = uvw[1];
    if (Math.abs(uvw[2]) > this.cue.contact || u < 0 || u > 1 || v < 0 || v > 1 || this.cue.scale === 0) {
      grad[0] = grad[1] = grad[2] = 0;
      return 0;
    }
    const slope = this.cue.scale * profileSlope(p, u, v);
    const d = p.axis === 'u' ? s.Ud : s.Vd;
    grad[0] = slope * d[0]; grad[1] = slope * d[1]; grad[2] = slope * d[2];
    return this.cue.scale * profileLevel(p, u, v);
  }

  displayGrid(): DisplayGrid {
    const n = SHEET_DISPLAY_NODES;
    const values = new Float32Array(n * n);
    for (let b = 0; b < n; b++)
      for (let a = 0; a < n; a++) values[b * n + a] = this.cue.scale * profileLevel(this.cue.profile, a / (n - 1), b / (n - 1));
    return { space: 'sheet', region: this.sheet.name, nu: n, nv: n, values };
  }
}
