import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { srgbToOklab, oklabToSrgb, toLinear, fromLinear } from '../../viewer/colour/oklab.ts';
import { sheetColour, sheetColourOklab, sheetColourBytes } from '../../viewer/colour/sheetColour.ts';
import { fieldColour, fieldScale } from '../../viewer/colour/fieldRamp.ts';
import { levelAt } from '../../viewer/geometry/fieldLayer.ts';

const dist = (p: number[], q: number[]) => Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);

// Colour-vision deficiency simulation matrices for full dichromacy (severity 1.0), applied to
// linear RGB: Machado, Oliveira & Fernandes, "A physiologically-based model for simulation of
// color vision deficiency", IEEE TVCG 15(6), 2009, table of matrices (from memory).
const DEUTAN = [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]];
const PROTAN = [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]];
function simulate(rgb: [number, number, number], m: number[][]): [number, number, number] {
  const lin = rgb.map(toLinear);
  const out = m.map((row) => Math.min(1, Math.max(0, row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2])));
  return out.map(fromLinear) as [number, number, number];
}

describe('OKLab conversion', () => {
  it('maps sRGB white and red to their published OKLab values', () => {
    // Ottosson (2020) normalises OKLab so white is L = 1, a = b = 0 (from memory).
    const w = srgbToOklab(1, 1, 1);
    expect(w[0]).toBeCloseTo(1, 3);
    expect(w[1]).toBeCloseTo(0, 3);
    expect(w[2]).toBeCloseTo(0, 3);
    // sRGB red in OKLab per CSS Color Module Level 4's worked conversions: (0.62796, 0.22486, 0.12585) (from memory).
    const r = srgbToOklab(1, 0, 0);
    expect(r[0]).toBeCloseTo(0.62796, 3);
    expect(r[1]).toBeCloseTo(0.22486, 3);
    expect(r[2]).toBeCloseTo(0.12585, 3);
  });

  it('round-trips every sRGB colour', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (r, g, b) => {
      const back = oklabToSrgb(...srgbToOklab(r, g, b));
      // 1e-5, not tighter: IEC 61966-2-1's two pieces do not quite meet at 0.04045 (linear
      // 0.0031308 vs power 0.0031306), so values in a sliver just above the break miss by ~2e-6
      expect(dist(back, [r, g, b])).toBeLessThan(1e-5);
    }));
  });

  it('sRGB transfer curve: IEC 61966-2-1 break point and mid-grey', () => {
    // IEC 61966-2-1: linear segment below 0.04045 (slope 1/12.92); 50 % encoded grey is about 21.4 % linear (from memory).
    expect(toLinear(0.04)).toBeCloseTo(0.04 / 12.92, 10);
    expect(toLinear(0.5)).toBeCloseTo(0.214, 3);
    expect(fromLinear(toLinear(0.73))).toBeCloseTo(0.73, 10);
  });
});

describe('source (u, v) colour map', () => {
  const corners: [number, number][] = [[0, 0], [1, 0], [0, 1], [1, 1]];

  it('keeps the four corners of the sheet well apart, also for protan and deutan viewers', () => {
    for (const sim of [null, DEUTAN, PROTAN]) {
      const labs = corners.map(([u, v]) => {
        const c = sheetColour(u, v);
        return srgbToOklab(...(sim ? simulate(c, sim) : c));
      });
      for (let i = 0; i < 4; i++) for (let j = i + 1; j < 4; j++) {
        // 0.1 in OKLab is a large, obvious difference (a just-noticeable one is about 0.02; common practice, no source)
        expect(dist(labs[i], labs[j]), `corners ${i},${j}`).toBeGreaterThan(sim ? 0.12 : 0.15);
      }
    }
  });

  it('neighbouring source positions get near colours and distant ones distinct colours', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 0.98, noNaN: true }), fc.double({ min: 0, max: 0.98, noNaN: true }), (u, v) => {
      const a = srgbToOklab(...sheetColour(u, v));
      const b = srgbToOklab(...sheetColour(u + 0.02, v + 0.02));
      expect(dist(a, b)).toBeLessThan(0.02);
    }));
    const a = srgbToOklab(...sheetColour(0.1, 0.5)), b = srgbToOklab(...sheetColour(0.9, 0.5));
    expect(dist(a, b)).toBeGreaterThan(0.15);
  });

  it('lightness rises with v, so v survives in greyscale', () => {
    for (const u of [0, 0.5, 1]) {
      let prev = -1;
      for (let v = 0; v <= 1; v += 0.1) {
        const L = srgbToOklab(...sheetColour(u, v))[0];
        expect(L).toBeGreaterThan(prev);
        prev = L;
      }
    }
    // design check: the map's own OKLab coordinates stay in gamut (no chroma clipped away)
    for (let u = 0; u <= 1; u += 0.125) for (let v = 0; v <= 1; v += 0.125) {
      expect(dist(srgbToOklab(...sheetColour(u, v)), sheetColourOklab(u, v))).toBeLessThan(2e-3);
    }
  });

  it('writes RGBA bytes and grey for missing coordinates', () => {
    const b = sheetColourBytes([0, NaN], [0, 0.5]);
    expect(b.length).toBe(8);
    expect(b[3]).toBe(255);
    expect([b[4], b[5], b[6]]).toEqual([140, 140, 140]);
  });
});

describe('field ramp and scales', () => {
  it('is lighter for every higher value', () => {
    let prev = -1;
    for (let t = 0; t <= 1.0001; t += 0.02) {
      const L = srgbToOklab(...fieldColour(t))[0];
      expect(L).toBeGreaterThan(prev);
      prev = L;
    }
  });
  it('log scale: ends map to 0 and 1, a decade is an equal step, levelAt inverts it', () => {
    const s = fieldScale(0.01, 100, true);
    expect(s(0.01)).toBeCloseTo(0, 12);
    expect(s(100)).toBeCloseTo(1, 12);
    expect(s(1)).toBeCloseTo(0.5, 12);
    for (const f of [0.1, 0.37, 0.9]) expect(s(levelAt(0.01, 100, true, f))).toBeCloseTo(f, 12);
    const lin = fieldScale(-2, 6, false);
    expect(lin(2)).toBeCloseTo(0.5, 12);
    expect(levelAt(-2, 6, false, 0.25)).toBeCloseTo(0, 12);
  });
});
