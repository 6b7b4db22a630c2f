import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { parseUrlView, formatUrlView } from '../../viewer/state/urlState.ts';
import { createStore } from '../../viewer/state/store.ts';
import { frameAt } from '../../viewer/model/runModel.ts';
import { FrameCost, leastSquaresLine } from '../../viewer/render/frameCost.ts';

describe('URL view parameters', () => {
  it('reads run, compare, t, camera, axon and cue, and writes them back', () => {
    const v = parseUrlView('?run=demo&compare=demo-ko&t=0.5&cam=top&axon=12&cue=glimmerin');
    expect(v).toEqual({ run: 'demo', compare: 'demo-ko', t: 0.5, cam: 'top', axon: 12, cue: 'glimmerin' });
    expect(parseUrlView(formatUrlView(v))).toEqual(v);
  });
  it('clamps t into [0, 1] and ignores what it does not understand', () => {
    expect(parseUrlView('?t=3').t).toBe(1);
    expect(parseUrlView('?t=-1').t).toBe(0);
    expect(parseUrlView('?t=abc&cam=fisheye&axon=-3').t).toBeNull();
    expect(parseUrlView('?cam=fisheye').cam).toBeNull();
    expect(parseUrlView('?axon=2.5').axon).toBeNull();
    expect(parseUrlView('').run).toBeNull();
  });
});

describe('store', () => {
  it('notifies only on real changes, with the previous state', () => {
    const s = createStore({ a: 1, b: 'x' });
    const seen: [number, number][] = [];
    s.subscribe((now, prev) => seen.push([now.a, prev.a]));
    s.set({ a: 1 });
    s.set({ a: 2 });
    s.set((x) => ({ a: x.a + 1 }));
    expect(seen).toEqual([[2, 1], [3, 2]]);
  });
});

describe('frame lookup by time', () => {
  it('gives the last frame at or before the time (checked against a linear scan)', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: 0, max: 5, noNaN: true }), { minLength: 1, maxLength: 30 }), fc.double({ min: -1, max: 200, noNaN: true }), (gaps, h) => {
      const times: number[] = [];
      gaps.reduce((t, g) => (times.push(t + g), t + g), 0);
      let want = 0;
      for (let f = 0; f < times.length; f++) if (times[f] <= h + 1e-9) want = f;
      expect(frameAt(times, h)).toBe(want);
    }));
  });
});

describe('frame cost model', () => {
  it('least squares recovers a line exactly and refuses when sizes are too alike', () => {
    const x = [1e4, 5e4, 2e5, 8e4, 3e5];
    const y = x.map((s) => 12 + 7e-4 * s);
    const fit = leastSquaresLine(x, y)!;
    expect(fit.slope).toBeCloseTo(7e-4, 12);
    expect(fit.intercept).toBeCloseTo(12, 8);
    expect(leastSquaresLine([1e5, 1e5, 1.01e5, 1e5], [1, 2, 3, 4])).toBeNull();
  });
  it('learns base and per-segment cost from noisy frames and predicts the budget', () => {
    const c = new FrameCost();
    let seed = 1;
    const noise = () => ((seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5) * 2; // ±2 ms
    for (let i = 0; i < 40; i++) {
      const s = 2e4 + ((i * 37) % 10) * 3e4;
      c.observe(s, 20 + 9e-4 * s + noise());
    }
    expect(c.baseMs).toBeCloseTo(20, 0);
    expect(c.perSegmentMs / 9e-4).toBeCloseTo(1, 1);
    expect(c.segmentsWithin(65)).toBeGreaterThan(45_000);
    expect(c.segmentsWithin(65)).toBeLessThan(55_000);
  });
});
