// OKLab ↔ sRGB, the perceptual colour space the viewer's colour maps are designed in, because
// equal steps in it look like equal steps (B. Ottosson, "A perceptual color space for image
// processing", 2020; the matrices below are that post's, from memory). sRGB's transfer curve is
// IEC 61966-2-1.

/** sRGB components in [0, 1] → OKLab [L, a, b] */
export function srgbToOklab(r: number, g: number, b: number): [number, number, number] {
  const lr = toLinear(r), lg = toLinear(g), lb = toLinear(b);
  const l = Math.cbrt(0.4122214708 * lr + 0.5363325363 * lg + 0.0514459929 * lb);
  const m = Math.cbrt(0.2119034982 * lr + 0.6806995451 * lg + 0.1073969566 * lb);
  const s = Math.cbrt(0.0883024619 * lr + 0.2817188376 * lg + 0.6299787005 * lb);
  return [
    0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  ];
}

/** OKLab → linear-light sRGB, not clipped (components outside [0, 1] mean out of gamut). */
export function oklabToLinearSrgb(L: number, a: number, b: number): [number, number, number] {
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.291485548 * b) ** 3;
  return [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s,
  ];
}

/** OKLab → sRGB in [0, 1]. Out-of-gamut colours keep their lightness and hue and lose chroma
 *  (bisection on the chroma scale) rather than being clipped per channel, which would shift hue. */
export function oklabToSrgb(L: number, a: number, b: number): [number, number, number] {
  let rgb = oklabToLinearSrgb(L, a, b);
  if (!inGamut(rgb)) {
    let lo = 0, hi = 1;
    for (let i = 0; i < 20; i++) {
      const mid = (lo + hi) / 2;
      if (inGamut(oklabToLinearSrgb(L, a * mid, b * mid))) lo = mid;
      else hi = mid;
    }
    rgb = oklabToLinearSrgb(L, a * lo, b * lo);
  }
  return [fromLinear(clamp01(rgb[0])), fromLinear(clamp01(rgb[1])), fromLinear(clamp01(rgb[2]))];
}

/** IEC 61966-2-1 sRGB decoding: encoded value → linear light */
export function toLinear(c: number): number {
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}

/** IEC 61966-2-1 sRGB encoding: linear light → encoded value */
export function fromLinear(c: number): number {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
}

// --- private helpers ---

function inGamut(rgb: [number, number, number]): boolean {
  const e = 1e-6;
  return rgb[0] >= -e && rgb[0] <= 1 + e && rgb[1] >= -e && rgb[1] <= 1 + e && rgb[2] >= -e && rgb[2] <= 1 + e;
}

function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
