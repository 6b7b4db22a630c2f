// Map metrics on synthetic maps whose answers are known by construction, the reference-run
// placement against a known smooth map, and the competition neighbour sums against brute force.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { sampleRankCorrelation } from 'simple-statistics';
import { mapSummary, orderFlipFraction, duplicationAlong, MAP_METRIC_KEYS } from '../../engine/map/metrics.ts';
import { DEFAULT_PAIRING, referencePlacement, type AxisPairing } from '../../engine/map/expected.ts';
import { TerminalCompetition, pairEnergy } from '../../engine/agents/targeting/competition.ts';
import { Sheet } from '../../engine/geometry/regions.ts';
import { stream, gaussian } from '../../engine/agents/random.ts';

function sample(n: number, seed: number, place: (su: number, sv: number, rng: () => number) => [number, number]) {
  const rng = stream(seed, 'map-metrics-test');
  const su = new Float64Array(n), sv = new Float64Array(n), tu = new Float64Array(n), tv = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    su[i] = rng(); sv[i] = rng();
    [tu[i], tv[i]] = place(su[i], sv[i], rng);
  }
  return { su, sv, tu, tv };
}

const zeros = (n: number) => new Float64Array(n);

describe('map summary', () => {
  it('has exactly the eight documented keys', () => {
    const s = sample(50, 1, (u, v) => [u, v]);
    expect(Object.keys(mapSummary({ ...s, errorUm: zeros(50), ectopic: zeros(50) }, DEFAULT_PAIRING))).toEqual([...MAP_METRIC_KEYS]);
  });
  it('a perfect map: ρ = 1 on both axes and no order flips (by construction)', () => {
    const s = sample(2000, 2, (u, v) => [u, v]);
    const m = mapSummary({ ...s, errorUm: zeros(2000), ectopic: zeros(2000) }, DEFAULT_PAIRING);
    expect(m.spearmanU).toBeCloseTo(1, 12);
    expect(m.spearmanV).toBeCloseTo(1, 12);
    expect(m.orderFlipFraction).toBe(0);
  });
  it('a reversed, axis-swapped map stated as such: ρ keeps the sign, no flips', () => {
    const pairing: AxisPairing = { u: { from: 'v', reversed: true }, v: { from: 'u', reversed: false } };
    const s = sample(2000, 3, (u, v) => [1 - v, u]);
    const m = mapSummary({ ...s, errorUm: zeros(2000), ectopic: zeros(2000) }, pairing);
    expect(m.spearmanU).toBeCloseTo(-1, 12);
    expect(m.spearmanV).toBeCloseTo(1, 12);
    expect(m.orderFlipFraction).toBe(0);
  });
  it('a random map: ρ ≈ 0 and half the neighbouring pairs flip (independence)', () => {
    const s = sample(5000, 4, (_u, _v, rng) => [rng(), rng()]);
    const m = mapSummary({ ...s, errorUm: zeros(5000), ectopic: zeros(5000) }, DEFAULT_PAIRING);
    expect(Math.abs(m.spearmanU)).toBeLessThan(0.05);
    expect(m.orderFlipFraction).toBeGreaterThan(0.46);
    expect(m.orderFlipFraction).toBeLessThan(0.54);
  });
  it('ρ on a noisy map equals simple-statistics’ sampleRankCorrelation (reference library)', () => {
    const s = sample(800, 5, (u, v, rng) => [u + 0.1 * gaussian(rng), v * v]);
    const m = mapSummary({ ...s, errorUm: zeros(800), ectopic: zeros(800) }, DEFAULT_PAIRING);
    expect(m.spearmanU).toBeCloseTo(sampleRankCorrelation([...s.su], [...s.tu]), 12);
    expect(m.spearmanV).toBeCloseTo(1, 12);
  });
  it('errors: mean, median, p95 and the ectopic share of the given values', () => {
    const err = Float64Array.from({ length: 101 }, (_, i) => i); // 0..100
    const ect = Float64Array.from(err, (e) => (e > 90 ? 1 : 0));
    const s = sample(101, 6, (u, v) => [u, v]);
    const m = mapSummary({ ...s, errorUm: err, ectopic: ect }, DEFAULT_PAIRING);
    expect(m.meanErrorUm).toBeCloseTo(50, 12);
    expect(m.medianErrorUm).toBeCloseTo(50, 12);
    expect(m.p95ErrorUm).toBeCloseTo(95, 12); // h = 100·0.95 lands on the order statistic 95
    expect(m.ectopicFraction).toBeCloseTo(10 / 101, 12);
  });
  it('duplication: one zone per source bin stays below 5/9, two zones per bin go above it', () => {
    // within a 0.1-wide bin one zone spreads uniformly (BC = 5/9 at most); a duplicated map
    // puts half the axons 0.4 further along (two spikes: BC → 1); Sarle's threshold 5/9
    const single = sample(4000, 7, (u, v, rng) => [u + 0.01 * gaussian(rng), v]);
    const double = sample(4000, 8, (u, v, rng) => [0.5 * u + (rng() < 0.5 ? 0 : 0.4) + 0.01 * gaussian(rng), v]);
    expect(duplicationAlong(single.su, single.tu, 10)).toBeLessThan(5 / 9);
    expect(duplicationAlong(double.su, double.tu, 10)).toBeGreaterThan(0.8);
  });
  it('order flips: a hand-made pair along u whose target order is swapped counts once', () => {
    // two axons 0.01 apart along u on the source; on the target the second lies before the first
    const s = { su: [0.5, 0.51], sv: [0.5, 0.5], tu: [0.6, 0.4], tv: [0.5, 0.5] };
    expect(orderFlipFraction({ ...s, errorUm: [0, 0], ectopic: [0, 0] }, DEFAULT_PAIRING)).toBe(1);
    expect(orderFlipFraction({ ...s, tu: [0.4, 0.6], errorUm: [0, 0], ectopic: [0, 0] }, DEFAULT_PAIRING)).toBe(0);
  });
});

describe('reference-run placement', () => {
  it('recovers a smooth map from dense terminations (nearest-neighbour mean ≈ the map, error ~ spacing)', () => {
    const n = 20_000;
    const ref = sample(n, 9, (u, v) => [u * u, 1 - v]);
    const place = referencePlacement({ dir: 'synthetic', count: n, ...ref });
    const out = new Float64Array(2);
    const rng = stream(10, 'probe');
    for (let k = 0; k < 200; k++) {
      const u = rng(), v = rng();
      place.place(u, v, out);
      expect(Math.abs(out[0] - u * u)).toBeLessThan(0.03);
      expect(Math.abs(out[1] - (1 - v))).toBeLessThan(0.03);
    }
  });
});

describe('terminal competition', () => {
  const sheet = new Sheet({ name: 'p', shape: 'sheet', permissive: true, origin: [10, 0, 0], uAxis: [0, 300, 0], vAxis: [0, 0, 200] });
  const pointOn = (u: number, v: number) => { const p = new Float64Array(3); sheet.point(u, v, 0, p); return p; };
  it('density, density change and repulsion equal brute-force sums over all terminals', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: 1e6 }), fc.integer({ min: 1, max: 400 }), (seed, n) => {
      const rng = stream(seed, 'competition');
      const r = 10 + 40 * rng();
      const c = new TerminalCompetition(sheet, r, 4);
      const pts: Float64Array[] = [];
      c.clear();
      for (let i = 0; i < n; i++) { const p = pointOn(rng(), rng()); pts.push(p); c.add(i, p[0], p[1], p[2]); }
      c.commit();
      const self = Math.floor(rng() * n);
      const q = pts[self], p = pointOn(rng(), rng());
      let dq = 0, dp = 0, fx = 0, fy = 0, fz = 0;
      pts.forEach((x, j) => {
        if (j === self) return;
        const d = Math.hypot(x[0] - q[0], x[1] - q[1], x[2] - q[2]);
        dq += pairEnergy(d, r);
        dp += pairEnergy(Math.hypot(x[0] - p[0], x[1] - p[1], x[2] - p[2]), r);
        if (d < r && d > 0) {
          const f = ((2 / r) * (1 - d / r)) / d; // −∂/∂x of (1 − d/r)²
          fx += f * (q[0] - x[0]); fy += f * (q[1] - x[1]); fz += f * (q[2] - x[2]);
        }
      });
      const out = new Float64Array(3);
      c.repulsion(self, q[0], q[1], q[2], r, out);
      const close = (a: number, b: number) => Math.abs(a - b) < 1e-9 * Math.max(1, Math.abs(b));
      return close(c.density(self, q[0], q[1], q[2], r), dq) && close(c.densityChange(self, q[0], q[1], q[2], p[0], p[1], p[2], r), dp - dq)
        && close(out[0], fx) && close(out[1], fy) && close(out[2], fz);
    }), { numRuns: 150 });
  });
  it('the repulsion is minus the gradient of the density (central differences)', () => {
    const rng = stream(11, 'grad');
    const r = 30;
    const c = new TerminalCompetition(sheet, r, 64);
    c.clear();
    for (let i = 0; i < 60; i++) { const p = pointOn(0.4 + 0.2 * rng(), 0.4 + 0.2 * rng()); c.add(i, p[0], p[1], p[2]); }
    c.commit();
    const q = pointOn(0.5, 0.5), out = new Float64Array(3), h = 1e-4;
    c.repulsion(-1, q[0], q[1], q[2], r, out);
    const dy = (c.density(-1, q[0], q[1] + h, q[2], r) - c.density(-1, q[0], q[1] - h, q[2], r)) / (2 * h);
    const dz = (c.density(-1, q[0], q[1], q[2] + h, r) - c.density(-1, q[0], q[1], q[2] - h, r)) / (2 * h);
    expect(out[1]).toBeCloseTo(-dy, 6);
    expect(out[2]).toBeCloseTo(-dz, 6);
  });
});
