// Descriptive statistics for map errors and terminal positions: quantiles and a bimodality
// measure. Plain functions over number arrays.

/** Mean of the values (NaN for none). */
export function mean(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return values.length ? s / values.length : NaN;
}

/** The p-quantile by linear interpolation between order statistics, x[h] with h = (n − 1)·p
 *  (Hyndman & Fan, Am. Stat. 50, 1996, definition 7: R's and numpy's default). `sorted` must be
 *  ascending. NaN for an empty sample. */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  if (!(p >= 0 && p <= 1)) throw new RangeError(`quantile: p must be in [0, 1], got ${p}`);
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Sarle's bimodality coefficient
 *    b = (G₁² + 1) / (G₂ + 3(n − 1)² / ((n − 2)(n − 3)))
 *  with G₁, G₂ the adjusted sample skewness and excess kurtosis (Joanes & Gill, The
 *  Statistician 47, 1998). b = 1/3 for a normal, 5/9 for a uniform and → 1 for two separate
 *  spikes; above 5/9 suggests two modes (SAS/STAT user's guide, PROC CLUSTER; Pfister et al.,
 *  Front. Psychol. 4, 2013; from memory). NaN for n < 4 or no spread. */
export function bimodalityCoefficient(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 4) return NaN;
  const m = mean(values);
  let m2 = 0, m3 = 0, m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = values[i] - m, d2 = d * d;
    m2 += d2; m3 += d2 * d; m4 += d2 * d2;
  }
  m2 /= n; m3 /= n; m4 /= n;
  if (!(m2 > 0)) return NaN;
  const g1 = m3 / Math.pow(m2, 1.5), g2 = m4 / (m2 * m2) - 3;
  const G1 = (Math.sqrt(n * (n - 1)) / (n - 2)) * g1;
  const G2 = ((n - 1) / ((n - 2) * (n - 3))) * ((n + 1) * g2 + 6);
  return (G1 * G1 + 1) / (G2 + (3 * (n - 1) * (n - 1)) / ((n - 2) * (n - 3)));
}
