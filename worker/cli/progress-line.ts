/**
 * One progress line on stderr, rewritten in place on a terminal and printed every few seconds
 * otherwise (logs, CI): windows done/total, rate, real-time factor and ETA.
 */
export class ProgressLine {
  private lastAt = -Infinity;
  private readonly started = performance.now();
  private readonly tty = process.stderr.isTTY === true;

  constructor(private readonly intervalMs = 500) {}

  update(text: () => string, force = false): void {
    const now = performance.now();
    const every = this.tty ? this.intervalMs : Math.max(this.intervalMs, 5000);
    if (!force && now - this.lastAt < every) return;
    this.lastAt = now;
    if (this.tty) process.stderr.write(`\r\x1b[2K${text()}`);
    else process.stderr.write(`${text()}\n`);
  }

  done(text: string): void {
    process.stderr.write(this.tty ? `\r\x1b[2K${text}\n` : `${text}\n`);
  }

  elapsedS(): number {
    return (performance.now() - this.started) / 1000;
  }
}

export function clock(seconds: number): string {
  if (!Number.isFinite(seconds)) return '--:--';
  const s = Math.max(0, Math.round(seconds));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const ss = String(s % 60).padStart(2, '0');
  return h > 0 ? `${h}:${String(m).padStart(2, '0')}:${ss}` : `${m}:${ss}`;
}
