// A progress bar on stderr, drawn only when stderr is a terminal (never into logs or pipes).
export class ProgressBar {
  private readonly enabled: boolean;
  private readonly started = performance.now();
  private lastDraw = 0;
  private drawn = false;

  constructor(private readonly label: string, enabled = true) {
    this.enabled = enabled && Boolean(process.stderr.isTTY);
  }

  update(done: number, total: number, note = ''): void {
    if (!this.enabled) return;
    const now = performance.now();
    if (now - this.lastDraw < 100 && done < total) return;
    this.lastDraw = now;
    const width = 28;
    const f = total > 0 ? Math.min(1, done / total) : 0;
    const filled = Math.round(f * width);
    const elapsed = (now - this.started) / 1000;
    const eta = f > 0.02 ? Math.max(0, elapsed / f - elapsed) : NaN;
    const left = Number.isFinite(eta) ? ` · ${eta < 90 ? `${eta.toFixed(0)} s` : `${(eta / 60).toFixed(1)} min`} left` : '';
    process.stderr.write(`\r${this.label} [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${(f * 100).toFixed(0).padStart(3)}% ${note}${left}\x1b[K`);
    this.drawn = true;
  }

  /** a one-off message on its own line (e.g. "solving field …") */
  message(text: string): void {
    if (!this.enabled) return;
    process.stderr.write(`\r${text}\x1b[K`);
    this.drawn = true;
  }

  done(): void {
    if (this.enabled && this.drawn) process.stderr.write('\r\x1b[K');
  }
}
