// The two-dimensional colour map that paints every axon by where it started on its source
// sheet, so a topographic map reads at a glance: neighbours on the source sheet get similar
// colours, and a scrambled map looks scrambled.
//
// Design (ours), in OKLab so distances are perceptual:
//   u (0 → 1) turns the blue ↔ yellow axis b from −0.10 to +0.12 (and lifts lightness a little);
//   v (0 → 1) raises lightness L by 0.25 (and moves a from slightly green to neutral).
//   L = 0.55 + 0.10·u + 0.25·v,   a = −0.06 + 0.06·v,   b = −0.10 + 0.22·u
// Why these axes: the common colour-vision deficiencies (protan, deutan) lose the green ↔ red
// axis but keep blue ↔ yellow and lightness, so u and v both survive for those viewers. The
// coefficients were chosen by a grid search for the largest smallest difference between the
// four corners, for normal vision and for simulated protanopia and deuteranopia, with every
// colour of the sheet inside the sRGB gamut (none loses chroma) and lightness at least 0.55, so
// every axon stays visible on the viewer's dark background.
import { oklabToSrgb } from './oklab.ts';

export const SHEET_COLOUR_DESIGN = {
  L: { base: 0.55, u: 0.1, v: 0.25 },
  a: { base: -0.06, v: 0.06 },
  b: { base: -0.1, u: 0.22 },
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
  return [d.L.base + d.L.u * uu + d.L.v * vv, d.a.base + d.a.v * vv, d.b.base + d.b.u * uu];
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

function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
