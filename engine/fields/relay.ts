// A cell-to-cell relay: each cell of a chain (along a box axis) or a sheet (along u or v) makes
// a fraction α of what its upstream neighbour made, so cell n has
//     c_n = c₀ αⁿ,   an exponential with decay length h / |ln α|
// (geometric series; closed form). Between cell centres the level is interpolated
// geometrically, c(s) = c₀ α^(s/h − 1/2), which equals c_n at each centre s = (n + ½)h.
// Sensed by contact, like an expressed ligand.
import type { RelayCue } from '../scene/schema.ts';
import type { CueField, DisplayGrid, BuildContext } from './field.ts';
import { displaySpec, sampleOnVolume } from './field.ts';
import { SHEET_DISPLAY_NODES } from './expressed.ts';
import type { Box, Sheet } from '../geometry/regions.ts';

export function buildRelayField(cue: RelayCue, ctx: BuildContext): CueField {
  return new RelayField(cue, ctx);
}

class RelayField implements CueField {
  readonly kind = 'relay' as const;
  readonly sensing = 'contact' as const;
  readonly name: string;
  private readonly sheet?: Sheet;
  private readonly box?: Box;
  private readonly axisIndex: number; // 0..2 for a box axis
  private readonly lnAlphaPerUm: number;
  private readonly uvw = new Float64Array(3);

  constructor(private readonly cue: RelayCue, private readonly ctx: BuildContext) {
    this.name = cue.name;
    const region = ctx.regions.get(cue.region)!;
    if (region.shape === 'sheet') this.sheet = region as Sheet;
    else this.box = region as Box;
    this.axisIndex = 'xyz'.indexOf(cue.axis);
    this.lnAlphaPerUm = Math.log(cue.alpha) / cue.cellSpacing;
  }

  sample(x: number, y: number, z: number, grad: Float64Array): number {
    const c = this.cue;
    grad[0] = grad[1] = grad[2] = 0;
    let s: number; // distance from the relay's first edge, µm
    let dir0 = 0, dir1 = 0, dir2 = 0; // ∇s
    if (this.sheet) {
      const sh = this.sheet, uvw = this.uvw;
      sh.coords(x, y, z, uvw);
      if (Math.abs(uvw[2]) > c.contact || uvw[0] < 0 || uvw[0] > 1 || uvw[1] < 0 || uvw[1] > 1) return 0;
      const onU = c.axis === 'u';
      const t = onU ? uvw[0] : uvw[1];
      const len = onU ? sh.uLength : sh.vLength;
      const d = onU ? sh.Ud : sh.Vd;
      const sign = c.reversed ? -1 : 1;
      s = (c.reversed ? 1 - t : t) * len;
      dir0 = sign * d[0] * len; dir1 = sign * d[1] * len; dir2 = sign * d[2] * len;
    } else {
      const b = this.box!, m = c.contact;
      if (x < b.min[0] - m || x > b.max[0] + m || y < b.min[1] - m || y > b.max[1] + m || z < b.min[2] - m || z > b.max[2] + m) return 0;
      const a = this.axisIndex;
      const p = a === 0 ? x : a === 1 ? y : z;
      s = c.reversed ? b.max[a] - p : p - b.min[a];
      if (s < 0) s = 0;
      const sign = c.reversed ? -1 : 1;
      if (a === 0) dir0 = sign; else if (a === 1) dir1 = sign; else dir2 = sign;
    }
    const value = c.scale * c.first * Math.exp(this.lnAlphaPerUm * (s - c.cellSpacing / 2));
    const g = value * this.lnAlphaPerUm;
    grad[0] = g * dir0; grad[1] = g * dir1; grad[2] = g * dir2;
    return value;
  }

  displayGrid(): DisplayGrid {
    if (this.sheet) {
      const n = SHEET_DISPLAY_NODES, values = new Float32Array(n * n), p = new Float64Array(3), g = new Float64Array(3);
      for (let b = 0; b < n; b++)
        for (let a = 0; a < n; a++) {
          this.sheet.point(a / (n - 1), b / (n - 1), 0, p);
          values[b * n + a] = this.sample(p[0], p[1], p[2], g);
        }
      return { space: 'sheet', region: this.sheet.name, nu: n, nv: n, values };
    }
    return sampleOnVolume(this, displaySpec(this.ctx.grid));
  }
}
