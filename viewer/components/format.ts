// Number formatting for labels: few digits, units always shown by the caller.

/** Hours with one decimal below 100 h, none above. */
export function formatHours(h: number): string {
  return Math.abs(h) >= 100 ? h.toFixed(0) : h.toFixed(h % 1 === 0 ? 1 : 2).replace(/(\.\d)0$/, '$1');
}

/** Three significant digits, without exponent notation for everyday magnitudes. */
export function formatValue(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}

export function formatCount(n: number): string {
  return n.toLocaleString('en-US');
}
