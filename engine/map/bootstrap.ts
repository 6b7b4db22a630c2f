// Bootstrap confidence intervals for the mean over a handful of runs (one value per seed), and
// for a paired difference (the same seeds under two variants).
import type { Uniform } from '../agents/random.ts';
import { quantileSorted } from './stats.ts';

export interface Interval {
  mean: number;
  low: number;
  high: number;
  n: number;
}

/** Mean of `values` and its percentile bootstrap interval: resample n values with replacement
 *  `resamples` times, take the (α/2, 1 − α/2) quantiles of the resampled means (Efron &
 *  Tibshirani, An Introduction to the Bootstrap, 1993, ch. 13). NaN entries are dropped first.
 *  With one value the interval is that value; with none, all NaN. */
export function bootstrapMean(values: ArrayLike<number>, rng: Uniform, resamples = 2000, level = 0.95): Interval {
  const xs: number[] = [];
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) xs.push(values[i]);
  const n = xs.length;
  if (n === 0) return { mean: NaN, low: NaN, high: NaN, n };
  let m = 0;
  for (const x of xs) m += x;
  m /= n;
  if (n === 1) return { mean: m, low: m, high: m, n };
  const means = new Float64Array(resamples);
  for (let b = 0; b < resamples; b++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += xs[Math.floor(rng() * n)];
    means[b] = s / n;
  }
  means.sort();
  const a = (1 - level) / 2;
  return { mean: m, low: quantileSorted(means, a), high: quantileSorted(means, 1 - a), n };
}

/** The paired difference b − a (same index = same seed), with its bootstrap interval. Pairs with
 *  a NaN on either side are dropped. */
export function bootstrapPairedDifference(a: ArrayLike<number>, b: ArrayLike<number>, rng: Uniform, resamples = 2000, level = 0.95): Interval {
  const n = Math.min(a.length, b.length);
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = b[i] - a[i];
  return bootstrapMean(d, rng, resamples, level);
}
