// Overlay text sizes and the variant's name. Sizes for reading a projected 1080-line frame from
// the back of a room: title at least 48 px and time at least 40 px (a rule of thumb for slides,
// about 1/22 and 1/27 of the picture's height: common practice, no source).
import { describe, it, expect } from 'vitest';
import { OVERLAY_PX, overlayFontPx, overlayScale, variantLabel } from '../../viewer/record/overlay.ts';

describe('overlays', () => {
  it('at 1920×1080 the title is at least 48 px, the time 40 px, and nothing under 30 px', () => {
    expect(overlayFontPx(OVERLAY_PX.title, 1920, 1080)).toBeGreaterThanOrEqual(48);
    expect(overlayFontPx(OVERLAY_PX.time, 1920, 1080)).toBeGreaterThanOrEqual(40);
    for (const k of ['title', 'time', 'variant', 'scale', 'legend', 'label'] as const) expect(overlayFontPx(OVERLAY_PX[k], 1920, 1080)).toBeGreaterThanOrEqual(30);
  });

  it('sizes scale with the output, by its tighter side against 1920 × 1080', () => {
    expect(overlayFontPx(OVERLAY_PX.title, 3840, 2160)).toBe(2 * OVERLAY_PX.title);
    expect(overlayFontPx(OVERLAY_PX.time, 1280, 720)).toBe(Math.round((OVERLAY_PX.time * 2) / 3));
    expect(overlayScale(1080, 1920)).toBeCloseTo(1080 / 1920, 12); // portrait: the width limits
    expect(overlayFontPx(OVERLAY_PX.label, 16, 16)).toBe(8); // never below 8 px
  });

  it("names a run's variant from its manifest", () => {
    expect(variantLabel({ edits: [] })).toBe('normal');
    expect(variantLabel({ variant: 'knockout-thornin', edits: [{ op: 'knockout', cue: 'thornin' }] })).toBe('knockout-thornin');
    expect(variantLabel({ edits: [{ op: 'knockout', cue: 'thornin' }] })).toBe('knockout thornin');
    expect(variantLabel({ edits: [{ op: 'scale', cue: 'glimmerin', factor: 0.5 }, { op: 'adhesion', population: 'late', weight: 0 }] })).toBe('scale glimmerin ×0.5, adhesion late');
  });
});
