/**
 * Windows per second of one running job, smoothed (exponential moving average over the
 * node's progress ticks) so the ETA does not jump with every window. Pure, no timers.
 */
export class RateMeter {
  private lastDone: number;
  private lastAt: number;
  private rate: number | null = null;

  constructor(done: number, now: number, private readonly alpha = 0.3) {
    this.lastDone = done;
    this.lastAt = now;
  }

  /** Feeds the units done at `now` (ms); returns the smoothed rate, or null before the first full sample. */
  update(done: number, now: number): number | null {
    const dt = (now - this.lastAt) / 1000;
    if (dt < 0.2) return this.rate; // too short to measure
    const instant = Math.max(0, done - this.lastDone) / dt;
    this.rate = this.rate === null ? instant : this.alpha * instant + (1 - this.alpha) * this.rate;
    this.lastDone = done;
    this.lastAt = now;
    return this.rate;
  }

  get value(): number | null {
    return this.rate;
  }

  /** Seconds left for `remaining` units at the current rate; null while unknown. */
  eta(remaining: number): number | null {
    if (this.rate === null || this.rate <= 0) return null;
    return remaining / this.rate;
  }
}
