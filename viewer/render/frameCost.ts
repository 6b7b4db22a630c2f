// A running model of what drawing a frame costs, learnt from measured draw times, so the viewer
// can choose how much to draw: draw ms ≈ base + perSegment · segments. Software WebGL
// (SwiftShader) spends its time per line segment, so segments are the unit of work; the base
// covers regions, growth cones and state changes.
//
// The two coefficients are an ordinary least-squares line through the recent (segments, ms)
// pairs once those pairs differ enough in size to separate slope from intercept; until then
// only the slope is updated, through the base, from a starting guess.

const WINDOW = 40;

export class FrameCost {
  /** fixed cost of a frame, ms */
  baseMs = 8;
  /** cost of one line segment, ms (starting guess until measured: about 0.6 µs in SwiftShader) */
  perSegmentMs = 6e-4;
  samples = 0;
  private readonly seg: number[] = [];
  private readonly ms: number[] = [];

  observe(segments: number, ms: number): void {
    if (!(ms >= 0) || !Number.isFinite(ms) || !(segments >= 0)) return;
    this.seg.push(segments);
    this.ms.push(ms);
    if (this.seg.length > WINDOW) {
      this.seg.shift();
      this.ms.shift();
    }
    this.samples++;
    const fit = leastSquaresLine(this.seg, this.ms);
    if (fit && fit.slope > 0) {
      this.perSegmentMs = clamp(fit.slope, 1e-7, 1e-2);
      this.baseMs = clamp(fit.intercept, 0.5, 500);
    } else if (segments > 1000) {
      const per = clamp((ms - this.baseMs) / segments, 1e-7, 1e-2);
      this.perSegmentMs += 0.5 * (per - this.perSegmentMs);
    }
  }

  predictMs(segments: number): number {
    return this.baseMs + this.perSegmentMs * segments;
  }

  /** Segments that fit in a frame of `ms` milliseconds (at least `floor`). */
  segmentsWithin(ms: number, floor = 5_000): number {
    return Math.max(floor, Math.floor((ms - this.baseMs) / this.perSegmentMs));
  }
}

/** y = intercept + slope·x through the points, or null when the x values are too alike to tell
 *  slope from intercept (their spread below a fifth of their mean) or there are fewer than 4. */
export function leastSquaresLine(x: readonly number[], y: readonly number[]): { slope: number; intercept: number } | null {
  const n = x.length;
  if (n < 4) return null;
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxx = 0, sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) ** 2;
    sxy += (x[i] - mx) * (y[i] - my);
  }
  if (!(sxx > 0) || Math.sqrt(sxx / n) < 0.2 * Math.abs(mx)) return null;
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx };
}

function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}
