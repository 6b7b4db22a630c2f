// A box or ellipsoid region that secretes at a uniform rate per µm³, solved on the volume grid:
// D∇²c − kc + s(x) = 0 with s = rate inside the region and 0 outside.
import type { RegionCue } from '../scene/schema.ts';
import type { CueField, BuildContext } from './field.ts';
import { solvedField } from './solvedField.ts';

export function buildRegionField(cue: RegionCue, ctx: BuildContext): CueField {
  const region = ctx.regions.get(cue.region)!;
  const { nx, ny, nz, h } = ctx.grid;
  const source = new Float64Array(nx * ny * nz);
  const rate = cue.rate * cue.scale;
  let inside = 0;
  for (let k = 0, n = 0; k < nz; k++)
    for (let j = 0; j < ny; j++)
      for (let i = 0; i < nx; i++, n++)
        if (region.contains(i * h, j * h, k * h)) {
          source[n] = rate;
          inside++;
        }
  if (inside === 0) {
    // A region thinner than a voxel would silently secrete nothing; put it on its nearest node.
    const c = regionCentre(cue, ctx);
    const n = Math.round(c[0] / h) + nx * (Math.round(c[1] / h) + ny * Math.round(c[2] / h));
    source[n] = rate;
  }
  return solvedField(cue, ctx, source, cue.boundary);
}

function regionCentre(cue: RegionCue, ctx: BuildContext): [number, number, number] {
  const r = ctx.scene.regions.find((x) => x.name === cue.region)!;
  if (r.shape === 'box') return [(r.min[0] + r.max[0]) / 2, (r.min[1] + r.max[1]) / 2, (r.min[2] + r.max[2]) / 2];
  if (r.shape === 'ellipsoid') return r.center;
  if (r.shape === 'tube') return [(r.from[0] + r.to[0]) / 2, (r.from[1] + r.to[1]) / 2, (r.from[2] + r.to[2]) / 2];
  if (r.shape === 'sheet') return r.origin;
  throw new Error(`internal: a ${r.shape} region cannot secrete (load.ts rejects it)`);
}
