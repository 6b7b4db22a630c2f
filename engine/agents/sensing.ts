// How a growth cone reads a cue through one receptor: occupancy, its noise, and adaptation.
// Pure functions over numbers and a caller-owned output array; no allocation.
import type { Uniform } from './random.ts';
import { gaussian } from './random.ts';

/** Bound fraction of a receptor with dissociation constant K_d at concentration c:
 *  p(c) = c / (c + K_d)   (law of mass action at equilibrium). */
export function occupancy(c: number, kd: number): number {
  return c > 0 ? c / (c + kd) : 0;
}

/** Sensitivity of occupancy to a fractional change in concentration:
 *  c·dp/dc = c·K_d / (c + K_d)², which peaks at c = K_d
 *  (Goodhill & Urbach, J. Neurobiol. 41, 1999). */
export function occupancySensitivity(c: number, kd: number): number {
  return (c * kd) / ((c + kd) * (c + kd));
}

/** Gradient estimate by comparing bound receptors across the cone's width a.
 *  Along each axis the cone splits its N receptors into two halves at x ± a/2, where the
 *  concentration is c ± g·a/2 (first order from the sampled value and gradient). Bound counts
 *  are binomial(N/2, p±); their fractional difference
 *      Δ = p₊ − p₋ + ξ·√((p₊(1 − p₊) + p₋(1 − p₋)) / (N/2)),   ξ ~ N(0, 1)
 *  is the normal approximation of the binomial difference (Goodhill & Urbach 1999; Mortimer et
 *  al., PNAS 106, 2009). The cone's response is proportional to Δ up to a saturating
 *  difference Δ_sat, ĝ = Δ/Δ_sat with |ĝ| capped at 1 (this project's model choice: a steep,
 *  clear gradient turns the cone fully, a shallow or noise-dominated one nudges it). Writes ĝ
 *  into out[o..o+2]; returns |Δ|/σ̄, the signal-to-noise ratio with σ̄ the mean noise s.d. */
export function sensedGradientOccupancy(
  c: number, gx: number, gy: number, gz: number, kd: number, receptors: number, diameter: number,
  saturation: number, rng: Uniform, out: Float64Array, o: number,
): number {
  const half = receptors / 2;
  const r = diameter / 2;
  let dx = 0, dy = 0, dz = 0, sd = 0;
  for (let axis = 0; axis < 3; axis++) {
    const g = axis === 0 ? gx : axis === 1 ? gy : gz;
    const pp = occupancy(c + g * r, kd);
    const pm = occupancy(c - g * r, kd);
    const s = Math.sqrt((pp * (1 - pp) + pm * (1 - pm)) / half);
    const d = pp - pm + s * gaussian(rng);
    sd += s / 3;
    if (axis === 0) dx = d; else if (axis === 1) dy = d; else dz = d;
  }
  const mag = Math.sqrt(dx * dx + dy * dy + dz * dz);
  saturatingResponse(dx, dy, dz, mag, saturation, out, o);
  return sd > 0 ? mag / sd : mag > 0 ? Infinity : 0;
}

/** Filopodial sampling: M filopodia of length L point in random directions of the forward
 *  hemisphere; tip m reads occupancy p_m (binomial noise over N/M receptors); the cone turns
 *  toward Δ = (3/M) Σ (p_m − p̄) e_m (≈ L∇p for directions spread over the hemisphere),
 *  with the same saturating response as above. `sampleAt(x, y, z)` returns the
 *  concentration at a tip. Writes into out[o..o+2]. */
export function sensedGradientFilopodia(
  sampleAt: (x: number, y: number, z: number) => number,
  x: number, y: number, z: number, hx: number, hy: number, hz: number,
  kd: number, receptors: number, filopodia: number, length: number, saturation: number,
  rng: Uniform, tips: Float64Array, out: Float64Array, o: number,
): void {
  const per = receptors / filopodia;
  let mean = 0;
  for (let m = 0; m < filopodia; m++) {
    // uniform direction on the sphere (Marsaglia 1972), flipped into the forward hemisphere
    let ex = 0, ey = 0, ez = 0, s = 2;
    while (s >= 1 || s === 0) {
      ex = 2 * rng() - 1; ey = 2 * rng() - 1; s = ex * ex + ey * ey;
    }
    const f = 2 * Math.sqrt(1 - s);
    ex *= f; ey *= f; ez = 1 - 2 * s;
    if (ex * hx + ey * hy + ez * hz < 0) { ex = -ex; ey = -ey; ez = -ez; }
    const p = occupancy(sampleAt(x + length * ex, y + length * ey, z + length * ez), kd);
    const sd = Math.sqrt((p * (1 - p)) / per);
    const pn = p + sd * gaussian(rng);
    tips[4 * m] = ex; tips[4 * m + 1] = ey; tips[4 * m + 2] = ez; tips[4 * m + 3] = pn;
    mean += pn / filopodia;
  }
  let dx = 0, dy = 0, dz = 0;
  for (let m = 0; m < filopodia; m++) {
    const w = tips[4 * m + 3] - mean;
    dx += w * tips[4 * m]; dy += w * tips[4 * m + 1]; dz += w * tips[4 * m + 2];
  }
  const f = 3 / filopodia;
  dx *= f; dy *= f; dz *= f;
  saturatingResponse(dx, dy, dz, Math.sqrt(dx * dx + dy * dy + dz * dz), saturation, out, o);
}

/** ĝ = Δ/Δ_sat, capped at unit length */
function saturatingResponse(dx: number, dy: number, dz: number, mag: number, saturation: number, out: Float64Array, o: number): void {
  const k = mag > saturation ? 1 / mag : 1 / saturation;
  out[o] = dx * k; out[o + 1] = dy * k; out[o + 2] = dz * k;
}

/** Adaptation: the adapted level m relaxes toward the sensed concentration,
 *  dm/dt = (c − m)/τ, stepped exactly over Δt: m ← c + (m − c)·exp(−Δt/τ); the receptor then
 *  behaves as if K_d were K_d + m, keeping the cone in its sensitive range as c rises over
 *  orders of magnitude (desensitisation and resensitisation; Ming et al., Nature 417, 2002,
 *  from memory). */
export function adaptLevel(m: number, c: number, dtOverTau: number): number {
  return c + (m - c) * Math.exp(-dtOverTau);
}
