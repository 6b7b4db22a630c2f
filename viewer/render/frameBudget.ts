// How much to draw per frame, adapted to measured frame times. Software WebGL's cost per line
// segment varies with the machine, its load and what is on screen, so rather than trust a model
// the budget is steered by feedback: a frame well over the target time shrinks the budget in
// proportion, one well under grows it (at most doubling), and in between it is left alone, so
// the choice does not flicker between sample sizes.

export class FrameBudget {
  value: number;
  readonly targetMs: number;
  private readonly min: number;
  private readonly max: number;

  constructor(initial: number, targetMs: number, min: number, max: number) {
    this.value = initial;
    this.targetMs = targetMs;
    this.min = min;
    this.max = max;
  }

  /** After a frame that drew `used` units (segments) in `ms`; returns the new budget. */
  update(used: number, ms: number): number {
    if (!(ms > 0) || !Number.isFinite(ms)) return this.value;
    const ratio = this.targetMs / ms;
    if (ms > this.targetMs * 1.25) {
      this.value = Math.max(this.min, Math.min(this.value, used) * Math.max(0.3, ratio));
    } else if (ms < this.targetMs * 0.65 && used >= this.value * 0.5) {
      // grow only from frames that used most of the budget: a frame that had little to draw
      // says nothing about how much more would fit
      this.value = Math.min(this.max, Math.max(this.value, used) * Math.min(2, ratio * 0.9));
    }
    return this.value;
  }
}

/** A running mean (exponential) of a per-unit cost, for predictions. */
export class RateEstimate {
  value: number;
  private readonly weight: number;
  constructor(initial: number, weight = 0.3) {
    this.value = initial;
    this.weight = weight;
  }
  add(x: number): void {
    if (Number.isFinite(x) && x > 0) this.value += this.weight * (x - this.value);
  }
}
