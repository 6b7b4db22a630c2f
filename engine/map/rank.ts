// Rank statistics for maps: midranks and Spearman's rank correlation. A map is "ordered" when
// target position is a monotone function of source position, whatever its shape, which is what
// a rank correlation measures and a linear one does not.

/** Ranks 0..n−1 in input order; tied values share the mean of the ranks they span (midranks),
 *  so the result does not depend on the order the values are listed in. */
export function midranks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((a, b) => values[a] - values[b]);
  const ranks = new Float64Array(n);
  let i = 0;
  while (i < n) {
    let j = i;
    while (j + 1 < n && values[order[j + 1]] === values[order[i]]) j++;
    const r = (i + j) / 2;
    for (let k = i; k <= j; k++) ranks[order[k]] = r;
    i = j + 1;
  }
  return ranks;
}

/** Spearman's ρ: the Pearson correlation of the midranks,
 *    ρ = Σ (rxᵢ − r̄x)(ryᵢ − r̄y) / √(Σ (rxᵢ − r̄x)² · Σ (ryᵢ − r̄y)²)
 *  (Spearman, Am. J. Psychol. 15, 1904; midranks for ties as in Kendall, Rank Correlation
 *  Methods, 1948). Sign kept. NaN when fewer than two pairs or either side has no spread. */
export function spearman(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) throw new RangeError(`spearman: ${x.length} x values but ${y.length} y values`);
  if (x.length < 2) return NaN;
  return pearson(midranks(x), midranks(y));
}

function pearson(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  let ma = 0, mb = 0;
  for (let i = 0; i < n; i++) { ma += a[i]; mb += b[i]; }
  ma /= n; mb /= n;
  let sab = 0, saa = 0, sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i] - ma, db = b[i] - mb;
    sab += da * db; saa += da * da; sbb += db * db;
  }
  return saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : NaN;
}
