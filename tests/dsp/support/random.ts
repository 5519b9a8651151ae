/**
 * Seeded random numbers for reproducible Monte Carlo checks: mulberry32 (a common-practice
 * 32-bit generator, public domain) and Box–Muller for Gaussians.
 */
export class SeededRandom {
  private state: number;
  private spare = NaN;

  constructor(seed: number) {
    this.state = seed >>> 0;
  }

  /** Uniform on [0, 1). */
  uniform(): number {
    let t = (this.state = (this.state + 0x6d2b79f5) >>> 0);
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Standard normal (mean 0, variance 1). */
  normal(): number {
    if (!Number.isNaN(this.spare)) {
      const s = this.spare;
      this.spare = NaN;
      return s;
    }
    let u = 0;
    while (u === 0) u = this.uniform();
    const v = this.uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    this.spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  }

  /** Fills (re, im) pairs with circular complex Gaussian samples of the given power E|z|². */
  complexNormal(out: Float64Array, power = 1): void {
    const s = Math.sqrt(power / 2);
    for (let i = 0; i < out.length; i++) out[i] = s * this.normal();
  }
}
