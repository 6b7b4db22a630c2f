// Turning: the new heading combines persistence, cue terms, fasciculation and wall avoidance,
//   h = normalise(β·d + Σᵢ wᵢ sᵢ Rᵢ ĝᵢ + w_f f + w_b b),
// then is rotated by a random deviation drawn from the von Mises–Fisher distribution with
// concentration κ (Fisher, Proc. R. Soc. A 217, 1953).
import type { Uniform } from './random.ts';

/** Draws a unit vector from vMF(μ, κ) on S² and writes it into out[o..o+2].
 *  The cosine to μ has the closed-form inverse CDF w = 1 + ln(u + (1 − u)e^(−2κ))/κ
 *  (Wood, Commun. Stat. Simul. Comput. 23, 1994, the three-dimensional case); the azimuth is
 *  uniform. μ must be a unit vector. */
export function sampleVonMisesFisher(
  mx: number, my: number, mz: number, kappa: number, rng: Uniform, out: Float64Array, o: number,
): void {
  const u = rng();
  let w = 1 + Math.log(u + (1 - u) * Math.exp(-2 * kappa)) / kappa;
  if (w > 1) w = 1; else if (w < -1) w = -1;
  const phi = 2 * Math.PI * rng();
  // an orthonormal pair (e1, e2) perpendicular to μ (Frisvad-style branch on the largest axis)
  let ax: number, ay: number, az: number;
  if (Math.abs(mx) < 0.9) { ax = 0; ay = -mz; az = my; } else { ax = mz; ay = 0; az = -mx; }
  const al = Math.sqrt(ax * ax + ay * ay + az * az);
  ax /= al; ay /= al; az /= al;
  const bx = my * az - mz * ay, by = mz * ax - mx * az, bz = mx * ay - my * ax;
  const s = Math.sqrt(1 - w * w), c = Math.cos(phi), sn = Math.sin(phi);
  out[o] = w * mx + s * (c * ax + sn * bx);
  out[o + 1] = w * my + s * (c * ay + sn * by);
  out[o + 2] = w * mz + s * (c * az + sn * bz);
}

/** Wall push: zero beyond the margin, rising linearly to 1 at contact, b = (1 − d/margin)·n. */
export function wallPush(distance: number, margin: number): number {
  if (distance >= margin) return 0;
  return distance <= 0 ? 1 : 1 - distance / margin;
}
