// The fasciculation rule's pure functions on hand geometry: the adhesion term
// f = w_p·u⊥/r_f + w_t·σ·t̂, the split of guidance across a shaft, the release test
// |g⊥| > θ·|a| and the windowed shaft direction. Every expected value is worked out by hand
// from elementary vector algebra (projection onto a unit vector, Pythagoras) in the comment
// beside it; random cases are checked against three.js Vector3 (npm reference library).
import fc from 'fast-check';
import { Vector3 } from 'three';
import { describe, expect, it } from 'vitest';
import { adhesionTerm, acrossShaft, releases, shaftDirection } from '../../engine/agents/fasciculation.ts';
import { ShaftStore } from '../../engine/index/shaftIndex.ts';

const out = new Float64Array(3);
const v = () => Array.from(out);

describe('adhesionTerm', () => {
  it('beside an x-axis shaft, heading along it: pull across, full alignment', () => {
    // cone (0,10,0), nearest point q = (0,0,0), t̂ = (1,0,0), r_f = 20: u = (0,−10,0) ⟂ t̂,
    // so u⊥ = u; f = 1·(0,−10,0)/20 + 1·(+1)·(1,0,0) = (1, −0.5, 0)
    adhesionTerm(0, 10, 0, 1, 0, 0, 0, 0, 0, 1, 0, 0, 20, 1, 1, out);
    expect(v()).toEqual([1, -0.5, 0]);
  });

  it('heading against the shaft: the tangent flips to agree with the heading', () => {
    // same geometry, heading (−1,0,0): t̂·d = −1 < 0, σ = −1: f = (−1, −0.5, 0)
    adhesionTerm(0, 10, 0, -1, 0, 0, 0, 0, 0, 1, 0, 0, 20, 1, 1, out);
    expect(v()).toEqual([-1, -0.5, 0]);
  });

  it('perpendicular heading counts as agreeing (σ = +1 on the tie)', () => {
    adhesionTerm(0, 10, 0, 0, -1, 0, 0, 0, 0, 1, 0, 0, 20, 1, 1, out);
    expect(v()).toEqual([1, -0.5, 0]);
  });

  it('nearest point at a shaft end: only the part of u across the shaft pulls', () => {
    // cone (0,3,0), shaft starts at q = (5,0,0) along t̂ = (1,0,0): u = (5,−3,0),
    // u·t̂ = 5, u⊥ = (0,−3,0); with w_p = 2, w_t = 0.5, r_f = 10: f = 2·(0,−3,0)/10 + 0.5·(1,0,0)
    adhesionTerm(0, 3, 0, 1, 0, 0, 5, 0, 0, 1, 0, 0, 10, 2, 0.5, out);
    expect(out[0]).toBeCloseTo(0.5, 15);
    expect(out[1]).toBeCloseTo(-0.6, 15);
    expect(out[2]).toBe(0);
  });

  it('on the shaft the pull vanishes and only the alignment acts', () => {
    adhesionTerm(3, 4, 5, 0, 0, 1, 3, 4, 5, 0, 0, 1, 15, 1, 2, out);
    expect(v()).toEqual([0, 0, 2]);
  });

  it('zero-length segment (t̂ = 0): plain pull toward q', () => {
    // u = (3,4,0), |u| = 5 (Pythagoras); f = u/10
    adhesionTerm(0, 0, 0, 1, 0, 0, 3, 4, 0, 0, 0, 0, 10, 1, 1, out);
    expect(out[0]).toBeCloseTo(0.3, 15);
    expect(out[1]).toBeCloseTo(0.4, 15);
    expect(out[2]).toBe(0);
  });

  it('random cases: f agrees with the same formula in three.js Vector3', () => {
    const c = fc.double({ min: -50, max: 50, noNaN: true });
    const w = fc.double({ min: 0, max: 5, noNaN: true });
    fc.assert(fc.property(
      fc.tuple(c, c, c), fc.tuple(c, c, c), fc.tuple(c, c, c), fc.tuple(c, c, c),
      fc.double({ min: 1, max: 30, noNaN: true }), w, w,
      (X, D, Q, T, r, wp, wt) => {
        const t = new Vector3(...T);
        if (t.length() < 1e-3) return;
        t.normalize();
        const u = new Vector3(...Q).sub(new Vector3(...X));
        const uPerp = u.clone().sub(t.clone().multiplyScalar(u.dot(t)));
        const sigma = t.dot(new Vector3(...D)) >= 0 ? 1 : -1;
        const ref = uPerp.multiplyScalar(wp / r).add(t.clone().multiplyScalar(wt * sigma));
        adhesionTerm(...X, ...D, ...Q, t.x, t.y, t.z, r, wp, wt, out);
        expect(Math.hypot(out[0] - ref.x, out[1] - ref.y, out[2] - ref.z)).toBeLessThanOrEqual(1e-9 * (1 + ref.length()));
      },
    ), { numRuns: 500 });
  });
});

describe('acrossShaft and releases', () => {
  it('guidance along the shaft has no part across it and never releases', () => {
    acrossShaft(5, 0, 0, 1, 0, 0, out);
    expect(v()).toEqual([0, 0, 0]);
    expect(releases(out[0], out[1], out[2], 0.1, 0, 0, 0.01)).toBe(false);
  });

  it('oblique guidance: g = (3,4,0) across t̂ = (1,0,0) leaves g⊥ = (0,4,0)', () => {
    acrossShaft(3, 4, 0, 1, 0, 0, out);
    expect(v()).toEqual([0, 4, 0]);
  });

  it('release threshold |g⊥| > θ·|a|', () => {
    // a = (1, −0.5, 0): |a| = √1.25 ≈ 1.118; g⊥ = (0, 3, 0), |g⊥| = 3
    const a: [number, number, number] = [1, -0.5, 0];
    expect(releases(0, 3, 0, ...a, 1)).toBe(true); // 3 > 1.118
    expect(releases(0, 3, 0, ...a, 2.6)).toBe(true); // 3 > 2.907
    expect(releases(0, 3, 0, ...a, 2.7)).toBe(false); // 3 < 3.019
    // exactly at the threshold it holds: |g⊥| = 5 (3-4-5), a = (1,0,0), θ = 5
    expect(releases(3, 4, 0, 1, 0, 0, 5)).toBe(false);
    expect(releases(3, 4, 0, 1, 0, 0, 4.999)).toBe(true);
  });
});

describe('shaftDirection', () => {
  // shaft points (0,0,0) (10,0,0) (20,10,0) (30,10,0) (40,10,0) (50,0,0)
  const store = new ShaftStore(1, 8);
  for (const [x, y] of [[0, 0], [10, 0], [20, 10], [30, 10], [40, 10], [50, 0]]) store.append(0, x, y, 0);

  it('window 0 is the segment itself', () => {
    shaftDirection(store, 0, 1, 0, out); // (10,0)→(20,10): (1,1)/√2
    expect(out[0]).toBeCloseTo(Math.SQRT1_2, 15);
    expect(out[1]).toBeCloseTo(Math.SQRT1_2, 15);
  });

  it('window 2 spans points s−2 .. s+3, clipped to the shaft', () => {
    shaftDirection(store, 0, 2, 2, out); // points 0 → 5: (50,0,0), unit (1,0,0)
    expect(v()).toEqual([1, 0, 0]);
    shaftDirection(store, 0, 0, 2, out); // points 0 → 3: (30,10,0)/√1000
    expect(out[0]).toBeCloseTo(30 / Math.sqrt(1000), 15);
    expect(out[1]).toBeCloseTo(10 / Math.sqrt(1000), 15);
    shaftDirection(store, 0, 4, 2, out); // points 2 → 5 (clipped): (30,−10,0)/√1000
    expect(out[0]).toBeCloseTo(30 / Math.sqrt(1000), 15);
    expect(out[1]).toBeCloseTo(-10 / Math.sqrt(1000), 15);
  });

  it('a closed loop inside the window gives no direction', () => {
    const loop = new ShaftStore(1, 8);
    for (const [x, y] of [[0, 0], [10, 0], [10, 10], [0, 0]]) loop.append(0, x, y, 0);
    shaftDirection(loop, 0, 1, 2, out);
    expect(v()).toEqual([0, 0, 0]);
  });
});
