/**
 * Seeded pseudo-random numbers so a scenario regenerates bit for bit: sfc32 (Chris Doty-Humphrey's
 * Small Fast Counter, from the PractRand suite; common practice for seeded JS generators) and
 * Box–Muller normals (Box & Muller 1958, Ann. Math. Statist. 29(2):610–611).
 */
export class SeededRandom {
  private a: number;
  private b: number;
  private c: number;
  private d = 1;
  private spare = 0;
  private hasSpare = false;

  constructor(seed: number) {
    this.a = 0x9e3779b9;
    this.b = 0x243f6a88;
    this.c = seed >>> 0;
    for (let i = 0; i < 15; i++) this.uniform();
  }

  /** Uniform in [0, 1). */
  uniform(): number {
    const t = (((this.a + this.b) | 0) + this.d) | 0;
    this.d = (this.d + 1) | 0;
    this.a = this.b ^ (this.b >>> 9);
    this.b = (this.c + (this.c << 3)) | 0;
    this.c = (this.c << 21) | (this.c >>> 11);
    this.c = (this.c + t) | 0;
    return (t >>> 0) / 4294967296;
  }

  /** Standard normal. */
  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    const u1 = 1 - this.uniform();
    const u2 = this.uniform();
    const r = Math.sqrt(-2 * Math.log(u1));
    const th = 2 * Math.PI * u2;
    this.spare = r * Math.sin(th);
    this.hasSpare = true;
    return r * Math.cos(th);
  }

  /** Fills dst[start .. start+n) with normals of standard deviation sigma, adding to what is there. */
  addNormals(dst: Float64Array, start: number, n: number, step: number, sigma: number): void {
    let i = start;
    for (let k = 0; k < n; k++, i += step) dst[i] += sigma * this.normal();
  }
}
