// The two-dimensional colour map that paints every axon by where it started on its source
// sheet, so a topographic map reads at a glance: neighbours on the source sheet get similar
// colours, and a scrambled map looks scrambled.
//
// Design (ours), in OKLab so distances are perceptual:
//   u (0 → 1) drives the blue ↔ yellow axis b from −0.14 to +0.14;
//   v (0 → 1) drives lightness L from 0.60 to 0.88 and the green ↔ magenta axis a from −0.10 to +0.10.
// Why these axes: the common colour-vision deficiencies (protan, deutan) lose the green ↔ red
// axis but keep blue ↔ yellow and lightness, so for those viewers u is still carried by b and v
// by lightness; everyone else gets v twice. The lightness floor of 0.60 keeps every axon
// visible on the viewer's dark background. The centre of the sheet is a near-neutral grey,
// distinct from every edge.
import { oklabToSrgb } from './oklab.ts';

export const SHEET_COLOUR_DESIGN = {
  lightness: [0.6, 0.88],
  a: [-0.1, 0.1],
  b: [-0.14, 0.14],
} as const;

/** (u, v) ∈ [0, 1]² → sRGB in [0, 1]. Values outside [0, 1] are clamped first. */
export function sheetColour(u: number, v: number): [number, number, number] {
  const [L, a, b] = sheetColourOklab(u, v);
  return oklabToSrgb(L, a, b);
}

/** The OKLab coordinates the map assigns to (u, v). */
export function sheetColourOklab(u: number, v: number): [number, number, number] {
  const uu = clamp01(u), vv = clamp01(v);
  const d = SHEET_COLOUR_DESIGN;
  return [lerp(d.lightness[0], d.lightness[1], vv), lerp(d.a[0], d.a[1], vv), lerp(d.b[0], d.b[1], uu)];
}

/** Colours for many axons at once, as RGBA bytes (alpha 255), for a data texture. NaN
 *  coordinates (no source position) get mid grey. */
export function sheetColourBytes(u: ArrayLike<number>, v: ArrayLike<number>, out = new Uint8Array(u.length * 4)): Uint8Array {
  for (let i = 0; i < u.length; i++) {
    const ok = Number.isFinite(u[i]) && Number.isFinite(v[i]);
    const [r, g, b] = ok ? sheetColour(u[i], v[i]) : [0.55, 0.55, 0.55];
    out[i * 4] = Math.round(r * 255);
    out[i * 4 + 1] = Math.round(g * 255);
    out[i * 4 + 2] = Math.round(b * 255);
    out[i * 4 + 3] = 255;
  }
  return out;
}

/** CSS colour text for (u, v). */
export function sheetColourCss(u: number, v: number): string {
  const [r, g, b] = sheetColour(u, v);
  return `rgb(${Math.round(r * 255)}, ${Math.round(g * 255)}, ${Math.round(b * 255)})`;
}

function lerp(a: number, b: number, t: number): number {
  return a + (b - a) * t;
}
function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
