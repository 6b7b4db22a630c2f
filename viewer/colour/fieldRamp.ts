// The sequential colour scale for cue concentrations (slices, sheet fields, the colour bar).
// Our own design in OKLab: lightness rises steadily from 0.22 to 0.96, so higher always reads as
// lighter (also in greyscale and for every colour-vision deficiency), while hue turns from violet
// through teal and green to yellow to add separation between levels.
import { oklabToSrgb } from './oklab.ts';

const LUT_SIZE = 256;
let lut: Uint8Array | null = null;

/** t ∈ [0, 1] → sRGB in [0, 1] */
export function fieldColour(t: number): [number, number, number] {
  const x = t < 0 ? 0 : t > 1 ? 1 : t;
  const L = 0.22 + 0.74 * x;
  const hue = ((290 - 190 * x) * Math.PI) / 180;
  const C = 0.07 + 0.08 * Math.sin(Math.PI * Math.min(1, x * 1.15));
  return oklabToSrgb(L, C * Math.cos(hue), C * Math.sin(hue));
}

/** 256 RGBA entries of the ramp, computed once. */
export function fieldRampBytes(): Uint8Array {
  if (lut) return lut;
  lut = new Uint8Array(LUT_SIZE * 4);
  for (let i = 0; i < LUT_SIZE; i++) {
    const [r, g, b] = fieldColour(i / (LUT_SIZE - 1));
    lut.set([Math.round(r * 255), Math.round(g * 255), Math.round(b * 255), 255], i * 4);
  }
  return lut;
}

/** Maps a concentration to [0, 1] on a linear or a log10 scale between lo and hi. On the log
 *  scale, lo is raised to hi·1e−4 if it is not positive, so the scale spans four decades. */
export function fieldScale(lo: number, hi: number, log: boolean): (c: number) => number {
  if (log) {
    const top = hi > 0 ? hi : 1;
    const bottom = lo > 0 && lo < top ? lo : top * 1e-4;
    const l0 = Math.log10(bottom), span = Math.log10(top) - l0 || 1;
    return (c) => (c > 0 ? (Math.log10(c) - l0) / span : 0);
  }
  const span = hi - lo || 1;
  return (c) => (c - lo) / span;
}

/** CSS linear-gradient for a colour bar, bottom (low) to top (high). */
export function fieldRampCss(direction = 'to top'): string {
  const stops: string[] = [];
  for (let i = 0; i <= 10; i++) {
    const [r, g, b] = fieldColour(i / 10);
    stops.push(`rgb(${Math.round(r * 255)},${Math.round(g * 255)},${Math.round(b * 255)}) ${i * 10}%`);
  }
  return `linear-gradient(${direction}, ${stops.join(', ')})`;
}
