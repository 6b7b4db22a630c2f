// A tube: every point within `radius` of the segment from→to (a capsule: a cylinder with
// hemispherical caps). Guidance corridors are tubes; the capsule keeps the distance exact
// and continuous everywhere, which a flat-ended cylinder would not at its rims.
import type { TubeRegion } from '../scene/schema.ts';
import type { CompiledRegion } from './regions.ts';

export class Tube implements CompiledRegion {
  readonly shape = 'tube' as const;
  readonly name: string;
  readonly permissive: boolean;
  readonly a: Float64Array;
  /** axis vector to − from */
  readonly axis: Float64Array;
  readonly length: number;
  readonly radius: number;
  private readonly invLen2: number;

  constructor(r: TubeRegion) {
    this.name = r.name;
    this.permissive = r.permissive;
    this.a = Float64Array.from(r.from);
    this.axis = Float64Array.of(r.to[0] - r.from[0], r.to[1] - r.from[1], r.to[2] - r.from[2]);
    const l2 = this.axis[0] ** 2 + this.axis[1] ** 2 + this.axis[2] ** 2;
    this.length = Math.sqrt(l2);
    this.invLen2 = l2 > 0 ? 1 / l2 : 0; // a zero-length tube is a ball
    this.radius = r.radius;
  }

  contains(x: number, y: number, z: number): boolean {
    return this.axisDistance(x, y, z, null) <= this.radius;
  }

  /** distance from the surface (< 0 inside); the normal points away from the axis */
  distance(x: number, y: number, z: number, n: Float64Array): number {
    const d = this.axisDistance(x, y, z, n);
    return d - this.radius;
  }

  /** position t ∈ [0, 1] along the axis of the nearest axis point */
  axisParameter(x: number, y: number, z: number): number {
    const t = ((x - this.a[0]) * this.axis[0] + (y - this.a[1]) * this.axis[1] + (z - this.a[2]) * this.axis[2]) * this.invLen2;
    return t < 0 ? 0 : t > 1 ? 1 : t;
  }

  /** distance to the axis segment; writes the unit direction away from it into n (if given) */
  private axisDistance(x: number, y: number, z: number, n: Float64Array | null): number {
    const t = this.axisParameter(x, y, z);
    const qx = x - (this.a[0] + t * this.axis[0]);
    const qy = y - (this.a[1] + t * this.axis[1]);
    const qz = z - (this.a[2] + t * this.axis[2]);
    const d = Math.sqrt(qx * qx + qy * qy + qz * qz);
    if (n) {
      if (d > 1e-12) {
        n[0] = qx / d; n[1] = qy / d; n[2] = qz / d;
      } else {
        // on the axis: any direction perpendicular to it will do
        perpendicular(this.axis, n);
      }
    }
    return d;
  }
}

function perpendicular(v: Float64Array, out: Float64Array): void {
  const ax = Math.abs(v[0]), ay = Math.abs(v[1]), az = Math.abs(v[2]);
  // cross with the basis vector least aligned with v
  let cx: number, cy: number, cz: number;
  if (ax <= ay && ax <= az) { cx = 0; cy = -v[2]; cz = v[1]; }
  else if (ay <= az) { cx = v[2]; cy = 0; cz = -v[0]; }
  else { cx = -v[1]; cy = v[0]; cz = 0; }
  const l = Math.sqrt(cx * cx + cy * cy + cz * cz);
  if (l < 1e-12) { out[0] = 1; out[1] = 0; out[2] = 0; return; }
  out[0] = cx / l; out[1] = cy / l; out[2] = cz / l;
}
