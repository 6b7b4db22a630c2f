// Region geometry compiled once per run into flat numbers, so the step loop can ask
// "inside?", "how far, and which way out?" and "where on the sheet?" without allocating.
import type { Region } from '../scene/schema.ts';
import { Tube } from './tube.ts';
import { Domain } from './domains.ts';

export interface CompiledRegion {
  readonly name: string;
  readonly shape: Region['shape'];
  readonly permissive: boolean;
  /** true when (x, y, z) is inside (for a sheet: within `thickness` of its plane, over it) */
  contains(x: number, y: number, z: number, thickness?: number): boolean;
  /** distance from the surface, > 0 outside; writes the outward unit normal into n[0..2] */
  distance(x: number, y: number, z: number, n: Float64Array): number;
}

/** A flat parallelogram with its own coordinates: p = origin + u·U + v·V, u, v ∈ [0, 1].
 *  The normal is U × V normalised (right-hand rule). */
export class Sheet implements CompiledRegion {
  readonly shape = 'sheet' as const;
  readonly name: string;
  readonly permissive: boolean;
  readonly o: Float64Array;
  readonly U: Float64Array;
  readonly V: Float64Array;
  readonly normal: Float64Array;
  /** dual basis: u = (p − o)·Ud, v = (p − o)·Vd (U and V need not be orthogonal) */
  readonly Ud: Float64Array;
  readonly Vd: Float64Array;
  readonly uLength: number;
  readonly vLength: number;

  constructor(r: Extract<Region, { shape: 'sheet' }>) {
    this.name = r.name;
    this.permissive = r.permissive;
    this.o = Float64Array.from(r.origin);
    this.U = Float64Array.from(r.uAxis);
    this.V = Float64Array.from(r.vAxis);
    const [ux, uy, uz] = r.uAxis;
    const [vx, vy, vz] = r.vAxis;
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    const cl = Math.hypot(cx, cy, cz);
    this.normal = Float64Array.of(cx / cl, cy / cl, cz / cl);
    // Inverse of the Gram matrix [[U·U, U·V], [U·V, V·V]] gives the dual vectors.
    const a = ux * ux + uy * uy + uz * uz, b = ux * vx + uy * vy + uz * vz, d = vx * vx + vy * vy + vz * vz;
    const det = a * d - b * b;
    const i00 = d / det, i01 = -b / det, i11 = a / det;
    this.Ud = Float64Array.of(i00 * ux + i01 * vx, i00 * uy + i01 * vy, i00 * uz + i01 * vz);
    this.Vd = Float64Array.of(i01 * ux + i11 * vx, i01 * uy + i11 * vy, i01 * uz + i11 * vz);
    this.uLength = Math.sqrt(a);
    this.vLength = Math.sqrt(d);
  }

  /** sheet coordinates of (x, y, z): out[0] = u, out[1] = v, out[2] = signed distance along the normal */
  coords(x: number, y: number, z: number, out: Float64Array): void {
    const px = x - this.o[0], py = y - this.o[1], pz = z - this.o[2];
    out[0] = px * this.Ud[0] + py * this.Ud[1] + pz * this.Ud[2];
    out[1] = px * this.Vd[0] + py * this.Vd[1] + pz * this.Vd[2];
    out[2] = px * this.normal[0] + py * this.normal[1] + pz * this.normal[2];
  }

  /** the point at (u, v), offset `w` µm along the normal, into out[0..2] */
  point(u: number, v: number, w: number, out: Float64Array): void {
    for (let a = 0; a < 3; a++) out[a] = this.o[a] + u * this.U[a] + v * this.V[a] + w * this.normal[a];
  }

  contains(x: number, y: number, z: number, thickness = 1): boolean {
    const px = x - this.o[0], py = y - this.o[1], pz = z - this.o[2];
    const w = px * this.normal[0] + py * this.normal[1] + pz * this.normal[2];
    if (Math.abs(w) > thickness) return false;
    const u = px * this.Ud[0] + py * this.Ud[1] + pz * this.Ud[2];
    const v = px * this.Vd[0] + py * this.Vd[1] + pz * this.Vd[2];
    return u >= 0 && u <= 1 && v >= 0 && v <= 1;
  }

  /** distance to the plane (over the sheet) or to its nearest edge (beyond it), normal pointing away */
  distance(x: number, y: number, z: number, n: Float64Array): number {
    const px = x - this.o[0], py = y - this.o[1], pz = z - this.o[2];
    const w = px * this.normal[0] + py * this.normal[1] + pz * this.normal[2];
    const u = clamp01(px * this.Ud[0] + py * this.Ud[1] + pz * this.Ud[2]);
    const v = clamp01(px * this.Vd[0] + py * this.Vd[1] + pz * this.Vd[2]);
    // nearest point on the parallelogram (exact for rectangles; close for skewed sheets)
    const qx = x - (this.o[0] + u * this.U[0] + v * this.V[0]);
    const qy = y - (this.o[1] + u * this.U[1] + v * this.V[1]);
    const qz = z - (this.o[2] + u * this.U[2] + v * this.V[2]);
    const dist = Math.sqrt(qx * qx + qy * qy + qz * qz);
    if (dist > 1e-12) {
      n[0] = qx / dist; n[1] = qy / dist; n[2] = qz / dist;
    } else {
      const s = w >= 0 ? 1 : -1;
      n[0] = s * this.normal[0]; n[1] = s * this.normal[1]; n[2] = s * this.normal[2];
    }
    return dist;
  }
}

export class Box implements CompiledRegion {
  readonly shape = 'box' as const;
  readonly name: string;
  readonly permissive: boolean;
  readonly min: Float64Array;
  readonly max: Float64Array;
  constructor(r: Extract<Region, { shape: 'box' }>) {
    this.name = r.name;
    this.permissive = r.permissive;
    this.min = Float64Array.from(r.min);
    this.max = Float64Array.from(r.max);
  }
  contains(x: number, y: number, z: number): boolean {
    return x >= this.min[0] && x <= this.max[0] && y >= this.min[1] && y <= this.max[1] && z >= this.min[2] && z <= this.max[2];
  }
  /** signed distance to an axis-aligned box (< 0 inside), gradient as the normal */
  distance(x: number, y: number, z: number, n: Float64Array): number {
    const cx = (this.min[0] + this.max[0]) / 2, cy = (this.min[1] + this.max[1]) / 2, cz = (this.min[2] + this.max[2]) / 2;
    const qx = Math.abs(x - cx) - (this.max[0] - this.min[0]) / 2;
    const qy = Math.abs(y - cy) - (this.max[1] - this.min[1]) / 2;
    const qz = Math.abs(z - cz) - (this.max[2] - this.min[2]) / 2;
    const ox = Math.max(qx, 0), oy = Math.max(qy, 0), oz = Math.max(qz, 0);
    const outside = Math.sqrt(ox * ox + oy * oy + oz * oz);
    if (outside > 0) {
      n[0] = (Math.sign(x - cx) * ox) / outside; n[1] = (Math.sign(y - cy) * oy) / outside; n[2] = (Math.sign(z - cz) * oz) / outside;
      return outside;
    }
    // inside: the nearest face decides
    n[0] = n[1] = n[2] = 0;
    if (qx >= qy && qx >= qz) n[0] = Math.sign(x - cx) || 1;
    else if (qy >= qz) n[1] = Math.sign(y - cy) || 1;
    else n[2] = Math.sign(z - cz) || 1;
    return Math.max(qx, qy, qz);
  }
}

export class Ellipsoid implements CompiledRegion {
  readonly shape = 'ellipsoid' as const;
  readonly name: string;
  readonly permissive: boolean;
  readonly c: Float64Array;
  readonly r: Float64Array;
  constructor(e: Extract<Region, { shape: 'ellipsoid' }>) {
    this.name = e.name;
    this.permissive = e.permissive;
    this.c = Float64Array.from(e.center);
    this.r = Float64Array.from(e.radii);
  }
  contains(x: number, y: number, z: number): boolean {
    const a = (x - this.c[0]) / this.r[0], b = (y - this.c[1]) / this.r[1], d = (z - this.c[2]) / this.r[2];
    return a * a + b * b + d * d <= 1;
  }
  /** First-order distance estimate f/|∇f| with f = |q| − 1 in scaled coordinates q = (p − c)/r:
   *  exact for spheres, close near the surface of an ellipsoid, which is where walls act. */
  distance(x: number, y: number, z: number, n: Float64Array): number {
    const a = (x - this.c[0]) / this.r[0], b = (y - this.c[1]) / this.r[1], d = (z - this.c[2]) / this.r[2];
    const q = Math.sqrt(a * a + b * b + d * d);
    if (q < 1e-12) {
      n[0] = 1; n[1] = 0; n[2] = 0;
      return -Math.min(this.r[0], this.r[1], this.r[2]);
    }
    const gx = a / (q * this.r[0]), gy = b / (q * this.r[1]), gz = d / (q * this.r[2]);
    const g = Math.sqrt(gx * gx + gy * gy + gz * gz);
    n[0] = gx / g; n[1] = gy / g; n[2] = gz / g;
    return (q - 1) / g;
  }
}

export function compileRegion(r: Region): CompiledRegion {
  switch (r.shape) {
    case 'box': return new Box(r);
    case 'ellipsoid': return new Ellipsoid(r);
    case 'sheet': return new Sheet(r);
    case 'tube': return new Tube(r);
    case 'domain': return new Domain(r); // bound to its border cue's fields when they are built
  }
}

export function compileRegions(regions: Region[]): Map<string, CompiledRegion> {
  return new Map(regions.map((r) => [r.name, compileRegion(r)]));
}

function clamp01(t: number): number {
  return t < 0 ? 0 : t > 1 ? 1 : t;
}
