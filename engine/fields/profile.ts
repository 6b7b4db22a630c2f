// Expression profiles: a level as a function of one sheet coordinate t ∈ [0, 1]. The same
// formulas serve ligands expressed on target sheets and receptors across source sheets.
import type { Profile } from '../scene/schema.ts';

/** Level at sheet coordinates (u, v). With t the profile's axis coordinate (1 − t if reversed):
 *    constant     offset + A
 *    linear       offset + A·t
 *    exponential  offset + A·exp(−r·(1 − t))     (A at t = 1, falling r e-folds to t = 0)
 *    sigmoid      offset + A / (1 + exp(−(t − m)/w))
 */
export function profileLevel(p: Profile, u: number, v: number): number {
  const t = axisCoordinate(p, u, v);
  return p.offset + p.amplitude * shapeAt(p, t);
}

/** d(level)/du (axis "u") or d(level)/dv (axis "v"): the slope along the sheet coordinate itself,
 *  with the sign flip of `reversed` already applied. */
export function profileSlope(p: Profile, u: number, v: number): number {
  const t = axisCoordinate(p, u, v);
  let d: number;
  switch (p.shape) {
    case 'constant': d = 0; break;
    case 'linear': d = 1; break;
    case 'exponential': d = p.rate * Math.exp(-p.rate * (1 - t)); break;
    case 'sigmoid': {
      const s = 1 / (1 + Math.exp(-(t - p.midpoint) / p.width));
      d = (s * (1 - s)) / p.width;
      break;
    }
  }
  return p.amplitude * d * (p.reversed ? -1 : 1);
}

/** Mean level over the sheet, offset + A·∫₀¹ shape(t) dt, with the integrals in closed form:
 *    constant 1;  linear 1/2;  exponential (1 − e^(−r))/r;
 *    sigmoid  w·ln[(1 + e^((1−m)/w)) / (1 + e^(−m/w))]   (∫ 1/(1 + e^(−x)) dx = ln(1 + e^x)).
 *  Used by the "flatten" edit, which shrinks a gradient around this level. */
export function profileMean(p: Profile): number {
  let m: number;
  switch (p.shape) {
    case 'constant': m = 1; break;
    case 'linear': m = 0.5; break;
    case 'exponential': m = -Math.expm1(-p.rate) / p.rate; break;
    case 'sigmoid': m = p.width * (softplus((1 - p.midpoint) / p.width) - softplus(-p.midpoint / p.width)); break;
  }
  return p.offset + p.amplitude * m;
}

/** ln(1 + eˣ) without overflow for large x */
function softplus(x: number): number {
  return x > 30 ? x : Math.log1p(Math.exp(x));
}

function axisCoordinate(p: Profile, u: number, v: number): number {
  const t = p.axis === 'u' ? u : v;
  return p.reversed ? 1 - t : t;
}

function shapeAt(p: Profile, t: number): number {
  switch (p.shape) {
    case 'constant': return 1;
    case 'linear': return t;
    case 'exponential': return Math.exp(-p.rate * (1 - t));
    case 'sigmoid': return 1 / (1 + Math.exp(-(t - p.midpoint) / p.width));
  }
}
