/**
 * Conventional (Bartlett) power through the array's distinct baselines.
 *
 * For unit-modulus steering vectors, conj(v_i)·v_j = exp(+j2πf·(p_j − p_i)·u/c) depends only on
 * the baseline p_j − p_i, so
 *   vᴴRv = tr R + 2·Re Σ_g c_g·e_g,   c_g = Σ_{i<j, p_j−p_i = d_g} R_ij,   e_g = exp(+j2πf·d_g·u/c)
 * (an exact regrouping of the same sum, common practice for the "co-array" of an array).
 * A line or grid array has far fewer distinct baselines than pairs (a uniform line of N
 * elements: N − 1 against N(N−1)/2), so after one pass over R per bin every look direction costs
 * G instead of N²/2 complex multiply-adds. bench/dsp-engine.ts, N = 32 line, 91 beams, CPU:
 * 218 µs per window-bin for the per-beam quadratic forms against a few µs this way. Arrays
 * without repeated baselines gain nothing and keep the quadratic form (`worthwhile`).
 */

/** Baselines closer than this fraction of the array's extent count as equal (float noise only). */
const BASELINE_RELATIVE_TOLERANCE = 1e-12;

export class BaselineGroups {
  readonly channels: number;
  /** G: distinct baselines among the pairs i < j. */
  readonly count: number;
  /** Group of each pair i < j, pairs in row-major upper-triangle order. */
  readonly pairGroup: Int32Array;
  /** A representative baseline per group, metres: [dx, dy, dz] × G. */
  readonly baselinesM: Float64Array;

  constructor(positionsM: Float64Array, channels: number) {
    const n = (this.channels = channels);
    let extent = 0;
    for (let i = 0; i < positionsM.length; i++) extent = Math.max(extent, Math.abs(positionsM[i]));
    const tol = Math.max(extent, 1e-3) * BASELINE_RELATIVE_TOLERANCE;
    const index = new Map<string, number>();
    const reps: number[] = [];
    this.pairGroup = new Int32Array((n * (n - 1)) / 2);
    let pair = 0;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        const dx = positionsM[3 * j] - positionsM[3 * i];
        const dy = positionsM[3 * j + 1] - positionsM[3 * i + 1];
        const dz = positionsM[3 * j + 2] - positionsM[3 * i + 2];
        const key = `${Math.round(dx / tol)},${Math.round(dy / tol)},${Math.round(dz / tol)}`;
        let g = index.get(key);
        if (g === undefined) {
          g = reps.length / 3;
          index.set(key, g);
          reps.push(dx, dy, dz);
        }
        this.pairGroup[pair++] = g;
      }
    }
    this.count = reps.length / 3;
    this.baselinesM = Float64Array.from(reps);
  }

  /** True when grouping saves work: at most a quarter as many groups as pairs. */
  get worthwhile(): boolean {
    return this.count * 4 <= this.pairGroup.length;
  }

  /**
   * Phase table e_g = exp(+j2πf·d_g·u/c) for every bin and look direction, written into dst at
   * ((bin·nBeams + beam)·G + g)·2 (re, im). `units` holds the look unit vectors [ux, uy, uz] × nBeams.
   */
  fillPhases(dst: Float64Array, binFreqsHz: Float64Array, units: Float64Array, speedMps: number): void {
    const g = this.count;
    const nBeams = units.length / 3;
    const d = this.baselinesM;
    for (let f = 0; f < binFreqsHz.length; f++) {
      const k = (2 * Math.PI * binFreqsHz[f]) / speedMps;
      for (let b = 0; b < nBeams; b++) {
        const base = (f * nBeams + b) * g * 2;
        const ux = units[3 * b];
        const uy = units[3 * b + 1];
        const uz = units[3 * b + 2];
        for (let q = 0; q < g; q++) {
          const phase = k * (d[3 * q] * ux + d[3 * q + 1] * uy + d[3 * q + 2] * uz);
          dst[base + 2 * q] = Math.cos(phase);
          dst[base + 2 * q + 1] = Math.sin(phase);
        }
      }
    }
  }

  /**
   * Per-group sums c_g of the strict upper triangle of R (at rOff) into sums[0…2G), and returns tr R.
   */
  sumByGroup(sums: Float64Array, r: Float64Array, rOff: number): number {
    const n = this.channels;
    const pg = this.pairGroup;
    sums.fill(0, 0, 2 * this.count);
    let trace = 0;
    let pair = 0;
    for (let i = 0; i < n; i++) {
      const row = rOff + 2 * i * n;
      trace += r[row + 2 * i];
      for (let j = i + 1; j < n; j++) {
        const g = 2 * pg[pair++];
        sums[g] += r[row + 2 * j];
        sums[g + 1] += r[row + 2 * j + 1];
      }
    }
    return trace;
  }
}

/** tr R + 2·Re Σ_g c_g·e_g for one look direction (phases at phases[pOff…], G groups). */
export function groupedQuadraticForm(trace: number, sums: Float64Array, phases: Float64Array, pOff: number, groups: number): number {
  let acc = 0;
  for (let q = 0; q < groups; q++) {
    acc += sums[2 * q] * phases[pOff + 2 * q] - sums[2 * q + 1] * phases[pOff + 2 * q + 1];
  }
  return trace + 2 * acc;
}
