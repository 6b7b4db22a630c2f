import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { parseUrlView, formatUrlView } from '../../viewer/state/urlState.ts';
import { createStore } from '../../viewer/state/store.ts';
import { frameAt } from '../../viewer/model/runModel.ts';
import { FrameBudget, RateEstimate } from '../../viewer/render/frameBudget.ts';

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

describe('frame budget', () => {
  // A machine whose frame time is linear in the segments drawn, ms = base + c·s (the shape
  // measured for SwiftShader lines), with ±10 % noise: the budget must settle where the frame
  // time is within the dead band around the target, from far too small and far too large starts.
  for (const [start, base, c] of [[3_000, 15, 5e-4], [5e6, 15, 5e-4], [60_000, 40, 2e-3], [60_000, 2, 1e-4]] as const) {
    it(`settles inside the band (start ${start}, ${base} ms + ${c} ms/segment)`, () => {
      const b = new FrameBudget(start, 50, 1_000, 1e7);
      let seed = 3;
      const noise = () => 1 + ((seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5) * 0.2;
      for (let i = 0; i < 30; i++) b.update(b.value, (base + c * b.value) * noise());
      const ms = base + c * b.value;
      expect(ms).toBeGreaterThan(50 * 0.65 * 0.85);
      expect(ms).toBeLessThan(50 * 1.25 * 1.15);
    });
  }
  it('does not grow from a frame that had little to draw', () => {
    const b = new FrameBudget(100_000, 50, 1_000, 1e7);
    b.update(2_000, 5);
    expect(b.value).toBe(100_000);
  });
  it('running estimate moves a fixed share toward each sample and ignores nonsense', () => {
    const r = new RateEstimate(10, 0.5);
    r.add(20);
    expect(r.value).toBe(15);
    r.add(NaN);
    r.add(-1);
    expect(r.value).toBe(15);
  });
});
