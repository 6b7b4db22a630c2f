// Rank and summary statistics of engine/map against the simple-statistics library from the npm
// registry (sampleRankCorrelation, quantile, sampleSkewness, sampleKurtosis), and against the
// closed forms they are defined by.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { sampleRankCorrelation, quantile, sampleSkewness, sampleKurtosis } from 'simple-statistics';
import { spearman, midranks } from '../../engine/map/rank.ts';
import { quantileSorted, bimodalityCoefficient } from '../../engine/map/stats.ts';
import { bootstrapMean, bootstrapPairedDifference } from '../../engine/map/bootstrap.ts';
import { stream, gaussian } from '../../engine/agents/random.ts';

// small integers give many ties, which is where rank definitions differ
const tiedPairs = fc.integer({ min: 3, max: 60 }).chain((n) =>
  fc.tuple(fc.array(fc.integer({ min: 0, max: 6 }), { minLength: n, maxLength: n }), fc.array(fc.integer({ min: 0, max: 6 }), { minLength: n, maxLength: n })));

describe('Spearman rank correlation', () => {
  it('equals simple-statistics sampleRankCorrelation, ties included (reference library)', () => {
    fc.assert(fc.property(tiedPairs, ([x, y]) => {
      const ref = sampleRankCorrelation(x, y);
      const ours = spearman(x, y);
      if (Number.isNaN(ref)) return Number.isNaN(ours);
      return Math.abs(ours - ref) < 1e-12;
    }), { numRuns: 300 });
  });
  it('equals simple-statistics on continuous data, and keeps the sign of a reversed order', () => {
    const rng = stream(1, 'spearman-test');
    const x = Array.from({ length: 500 }, () => rng());
    const y = x.map((v) => Math.exp(-3 * v) + 0.05 * rng());
    expect(spearman(x, y)).toBeCloseTo(sampleRankCorrelation(x, y), 12);
    expect(spearman(x, y)).toBeLessThan(-0.9);
    // a monotone transform does not change ρ (Spearman 1904: ρ depends on ranks only)
    expect(spearman(x, x.map((v) => v ** 3))).toBeCloseTo(1, 12);
  });
  it('midranks: tied values share the mean of their ranks (Kendall 1948)', () => {
    expect([...midranks([10, 20, 20, 30, 20])]).toEqual([0, 2, 2, 4, 2]);
  });
});

describe('quantiles', () => {
  it('definition 7 (Hyndman & Fan 1996) equals simple-statistics quantile', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 80 }), fc.double({ min: 0, max: 1, noNaN: true }), (xs, p) => {
      const sorted = Float64Array.from(xs).sort();
      const ref = quantile(xs, p);
      return Math.abs(quantileSorted(sorted, p) - ref) <= 1e-9 * Math.max(1, Math.abs(ref));
    }), { numRuns: 300 });
  });
});

describe("Sarle's bimodality coefficient", () => {
  it('is (G1² + 1)/(G2 + 3(n−1)²/((n−2)(n−3))) with simple-statistics’ adjusted skewness and kurtosis', () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: 4, maxLength: 60 }), (xs) => {
      const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
      if (xs.every((x) => Math.abs(x - mean) < 1e-6)) return true; // no spread: undefined
      const n = xs.length;
      const ref = (sampleSkewness(xs) ** 2 + 1) / (sampleKurtosis(xs) + (3 * (n - 1) ** 2) / ((n - 2) * (n - 3)));
      return Math.abs(bimodalityCoefficient(xs) - ref) < 1e-9 * Math.max(1, Math.abs(ref));
    }), { numRuns: 300 });
  });
  it('approaches 1/3 for a normal sample, 5/9 for a uniform one and 1 for two spikes (closed forms of the moments)', () => {
    const rng = stream(2, 'bimodality-test');
    const n = 200_000;
    const normal = Array.from({ length: n }, () => gaussian(rng));
    const uniform = Array.from({ length: n }, () => rng());
    const spikes = Array.from({ length: n }, (_, i) => (i % 2) + 1e-3 * rng());
    expect(bimodalityCoefficient(normal)).toBeCloseTo(1 / 3, 2); // skew 0, excess kurtosis 0
    expect(bimodalityCoefficient(uniform)).toBeCloseTo(5 / 9, 2); // skew 0, excess kurtosis −6/5
    expect(bimodalityCoefficient(spikes)).toBeCloseTo(1, 2); // skew 0, excess kurtosis −2
  });
});

describe('bootstrap interval of a mean', () => {
  it('for normal data has half-width ≈ 1.96 σ/√n, the normal-theory interval (Efron & Tibshirani 1993, ch. 13)', () => {
    const rng = stream(3, 'bootstrap-test');
    const n = 200;
    const xs = Array.from({ length: n }, () => 5 + 2 * gaussian(rng));
    const m = xs.reduce((a, b) => a + b, 0) / n;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1));
    const ci = bootstrapMean(xs, stream(3, 'resample'), 4000);
    expect(ci.mean).toBeCloseTo(m, 12);
    expect(ci.low).toBeLessThan(m);
    expect(ci.high).toBeGreaterThan(m);
    const half = (ci.high - ci.low) / 2;
    expect(half / ((1.96 * sd) / Math.sqrt(n))).toBeGreaterThan(0.9);
    expect(half / ((1.96 * sd) / Math.sqrt(n))).toBeLessThan(1.1);
  });
  it('paired difference: a constant shift has a zero-width interval at the shift', () => {
    const a = [1, 4, 2, 8, 5];
    const d = bootstrapPairedDifference(a, a.map((x) => x + 0.5), stream(4, 'x'));
    expect(d.mean).toBeCloseTo(0.5, 12);
    expect(d.low).toBeCloseTo(0.5, 12);
    expect(d.high).toBeCloseTo(0.5, 12);
  });
});
