/**
 * The per-beam part of the adaptive weights, four look directions at a time, from one Cholesky
 * factor R_L = L·Lᴴ per (bin, window):
 *   z = L⁻¹v (forward substitution), s = ‖z‖² = vᴴR_L⁻¹v,
 *   u = L⁻ᴴz = R_L⁻¹v (back substitution), so w = u/s and ‖w‖² = ‖u‖²/s².
 * Substitution, never an explicit inverse (DOMAIN.md §2), for the beams whose weights are
 * written out and wherever the explicit-inverse scan of loaded-inverse.ts is not safe (see
 * GROUPED_INVERSE_COND_LIMIT in window-engine.ts).
 *
 * Why four beams per pass (bench/dsp-engine.ts, CPU time, N = 32, 91 beams): each loaded
 * element of L feeds four complex multiply-adds whose running sums stay in local variables,
 * and the back substitution reads a conjugate-transposed copy of L row by row instead of
 * striding down its columns. Measured 434 µs per window-bin for the former one-beam-at-a-time
 * solves against the figure in the header of bench/dsp-engine.ts for this kernel.
 * Storage: interleaved (re, im), row-major (hermitian-cholesky.ts); z and u are element-major
 * with the four beams side by side: index (i·4 + t)·2 + (re | im).
 *
 * With the SIMD kernels built, setFactor and solve run on wasm/assembly/four-beam.ts (same loops,
 * each complex value on f64x2 lanes) and the arrays below are views of that instance's memory;
 * the JavaScript loops stay as the reference (tests/dsp/simd-kernels.test.ts) and the fallback.
 * bench/dsp-engine.ts, N = 32, 91 beams, CPU per window-bin: 253 µs (JavaScript) → 89 µs.
 */
import { instantiateKernels, kernelView, type KernelExports } from './wasm/simd-kernels.js';

/** Byte offsets of FourBeamSolver's arrays in its kernel instance's memory. */
function fourBeamLayout(n: number) {
  const m = 8 * 2 * n * n;
  const vec = 8 * 8 * n;
  const lower = 0;
  const upper = lower + m;
  const invDiag = upper + m;
  const v4 = invDiag + 8 * n;
  const z = v4 + vec;
  const u = z + vec;
  const norms = u + vec;
  return { lower, upper, invDiag, v4, z, u, norms, bytes: norms + 64 };
}

export class FourBeamSolver {
  readonly n: number;
  /** L, lower triangle (a copy of the factor). */
  private readonly lower: Float64Array;
  /** Lᴴ, upper triangle: upper[i][k] = conj(L[k][i]) for k ≥ i. */
  private readonly upper: Float64Array;
  private readonly invDiag: Float64Array;
  /** z = L⁻¹v of the four beams of the last call. */
  readonly z: Float64Array;
  /** u = R_L⁻¹v of the four beams of the last call. */
  readonly u: Float64Array;
  /** ‖z‖² = vᴴR_L⁻¹v per beam of the last call. */
  readonly zNorm2: Float64Array;
  /** ‖u‖² = ‖R_L⁻¹v‖² per beam of the last call. */
  readonly uNorm2: Float64Array;
  private readonly kernels: KernelExports | null;
  /** The four steering vectors of a call, packed like z (SIMD path only). */
  private readonly v4: Float64Array;
  private readonly at: ReturnType<typeof fourBeamLayout>;

  constructor(n: number, useSimd = true) {
    this.n = n;
    const at = (this.at = fourBeamLayout(n));
    const kernels = useSimd ? instantiateKernels(at.bytes) : null;
    this.kernels = kernels;
    if (kernels) {
      this.lower = kernelView(kernels, at.lower, 2 * n * n);
      this.upper = kernelView(kernels, at.upper, 2 * n * n);
      this.invDiag = kernelView(kernels, at.invDiag, n);
      this.v4 = kernelView(kernels, at.v4, 8 * n);
      this.z = kernelView(kernels, at.z, 8 * n);
      this.u = kernelView(kernels, at.u, 8 * n);
      this.zNorm2 = kernelView(kernels, at.norms, 4);
      this.uNorm2 = kernelView(kernels, at.norms + 32, 4);
    } else {
      this.lower = new Float64Array(2 * n * n);
      this.upper = new Float64Array(2 * n * n);
      this.invDiag = new Float64Array(n);
      this.v4 = new Float64Array(0);
      this.z = new Float64Array(8 * n);
      this.u = new Float64Array(8 * n);
      this.zNorm2 = new Float64Array(4);
      this.uNorm2 = new Float64Array(4);
    }
  }

  /** Takes the factor L (lower triangle of `l`, as written by choleskyFactor) for the next calls. */
  setFactor(l: Float64Array): void {
    const n = this.n;
    const kernels = this.kernels;
    if (kernels) {
      // Only the lower triangle is read; the strict upper triangle of l may hold anything.
      const m = 2 * n * n;
      this.lower.set(l.length === m ? l : l.subarray(0, m));
      const at = this.at;
      kernels.fourBeamFactor(at.lower, at.upper, at.invDiag, n);
      return;
    }
    const lo = this.lower;
    const up = this.upper;
    for (let i = 0; i < n; i++) {
      const row = 2 * i * n;
      for (let k = 0; k <= i; k++) {
        const re = l[row + 2 * k];
        const im = l[row + 2 * k + 1];
        lo[row + 2 * k] = re;
        lo[row + 2 * k + 1] = im;
        up[2 * (k * n + i)] = re;
        up[2 * (k * n + i) + 1] = -im;
      }
      this.invDiag[i] = 1 / l[row + 2 * i];
    }
  }

  /**
   * Solves for the four steering vectors at v[o0…], v[o1…], v[o2…], v[o3…] (2N doubles each;
   * offsets may repeat when fewer than four beams are left). Results in z, u, zNorm2, uNorm2.
   */
  solve(v: Float64Array, o0: number, o1: number, o2: number, o3: number): void {
    const n = this.n;
    const kernels = this.kernels;
    if (kernels) {
      const v4 = this.v4;
      for (let i = 0; i < n; i++) {
        const d = 8 * i;
        v4[d] = v[o0 + 2 * i];
        v4[d + 1] = v[o0 + 2 * i + 1];
        v4[d + 2] = v[o1 + 2 * i];
        v4[d + 3] = v[o1 + 2 * i + 1];
        v4[d + 4] = v[o2 + 2 * i];
        v4[d + 5] = v[o2 + 2 * i + 1];
        v4[d + 6] = v[o3 + 2 * i];
        v4[d + 7] = v[o3 + 2 * i + 1];
      }
      const at = this.at;
      kernels.solveFour(at.lower, at.upper, at.invDiag, at.v4, at.z, at.u, at.norms, n);
      return;
    }
    const lo = this.lower;
    const up = this.upper;
    const inv = this.invDiag;
    const z = this.z;
    const u = this.u;
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
    // Forward: z_i = (v_i − Σ_{k<i} L_ik·z_k) / L_ii.
    for (let i = 0; i < n; i++) {
      const row = 2 * i * n;
      let a0r = 0, a0i = 0, a1r = 0, a1i = 0, a2r = 0, a2i = 0, a3r = 0, a3i = 0;
      for (let k = 0; k < i; k++) {
        const lr = lo[row + 2 * k];
        const li = lo[row + 2 * k + 1];
        const zb = 8 * k;
        const z0r = z[zb], z0i = z[zb + 1], z1r = z[zb + 2], z1i = z[zb + 3];
        const z2r = z[zb + 4], z2i = z[zb + 5], z3r = z[zb + 6], z3i = z[zb + 7];
        a0r += lr * z0r - li * z0i;
        a0i += lr * z0i + li * z0r;
        a1r += lr * z1r - li * z1i;
        a1i += lr * z1i + li * z1r;
        a2r += lr * z2r - li * z2i;
        a2i += lr * z2i + li * z2r;
        a3r += lr * z3r - li * z3i;
        a3i += lr * z3i + li * z3r;
      }
      const d = inv[i];
      const zb = 8 * i;
      const e0r = (v[o0 + 2 * i] - a0r) * d, e0i = (v[o0 + 2 * i + 1] - a0i) * d;
      const e1r = (v[o1 + 2 * i] - a1r) * d, e1i = (v[o1 + 2 * i + 1] - a1i) * d;
      const e2r = (v[o2 + 2 * i] - a2r) * d, e2i = (v[o2 + 2 * i + 1] - a2i) * d;
      const e3r = (v[o3 + 2 * i] - a3r) * d, e3i = (v[o3 + 2 * i + 1] - a3i) * d;
      z[zb] = e0r;
      z[zb + 1] = e0i;
      z[zb + 2] = e1r;
      z[zb + 3] = e1i;
      z[zb + 4] = e2r;
      z[zb + 5] = e2i;
      z[zb + 6] = e3r;
      z[zb + 7] = e3i;
      s0 += e0r * e0r + e0i * e0i;
      s1 += e1r * e1r + e1i * e1i;
      s2 += e2r * e2r + e2i * e2i;
      s3 += e3r * e3r + e3i * e3i;
    }
    this.zNorm2[0] = s0;
    this.zNorm2[1] = s1;
    this.zNorm2[2] = s2;
    this.zNorm2[3] = s3;
    // Back: u_i = (z_i − Σ_{k>i} conj(L_ki)·u_k) / L_ii.
    let q0 = 0, q1 = 0, q2 = 0, q3 = 0;
    for (let i = n - 1; i >= 0; i--) {
      const row = 2 * i * n;
      let a0r = 0, a0i = 0, a1r = 0, a1i = 0, a2r = 0, a2i = 0, a3r = 0, a3i = 0;
      for (let k = i + 1; k < n; k++) {
        const lr = up[row + 2 * k];
        const li = up[row + 2 * k + 1];
        const ub = 8 * k;
        const u0r = u[ub], u0i = u[ub + 1], u1r = u[ub + 2], u1i = u[ub + 3];
        const u2r = u[ub + 4], u2i = u[ub + 5], u3r = u[ub + 6], u3i = u[ub + 7];
        a0r += lr * u0r - li * u0i;
        a0i += lr * u0i + li * u0r;
        a1r += lr * u1r - li * u1i;
        a1i += lr * u1i + li * u1r;
        a2r += lr * u2r - li * u2i;
        a2i += lr * u2i + li * u2r;
        a3r += lr * u3r - li * u3i;
        a3i += lr * u3i + li * u3r;
      }
      const d = inv[i];
      const ub = 8 * i;
      const e0r = (z[ub] - a0r) * d, e0i = (z[ub + 1] - a0i) * d;
      const e1r = (z[ub + 2] - a1r) * d, e1i = (z[ub + 3] - a1i) * d;
      const e2r = (z[ub + 4] - a2r) * d, e2i = (z[ub + 5] - a2i) * d;
      const e3r = (z[ub + 6] - a3r) * d, e3i = (z[ub + 7] - a3i) * d;
      u[ub] = e0r;
      u[ub + 1] = e0i;
      u[ub + 2] = e1r;
      u[ub + 3] = e1i;
      u[ub + 4] = e2r;
      u[ub + 5] = e2i;
      u[ub + 6] = e3r;
      u[ub + 7] = e3i;
      q0 += e0r * e0r + e0i * e0i;
      q1 += e1r * e1r + e1i * e1i;
      q2 += e2r * e2r + e2i * e2i;
      q3 += e3r * e3r + e3i * e3i;
    }
    this.uNorm2[0] = q0;
    this.uNorm2[1] = q1;
    this.uNorm2[2] = q2;
    this.uNorm2[3] = q3;
  }

  /** Copies u_t·scale (beam t of the last call) into dst[dOff…] as an interleaved 2N vector. */
  copyU(t: number, dst: Float64Array, dOff: number, scale: number): void {
    const u = this.u;
    for (let i = 0; i < this.n; i++) {
      dst[dOff + 2 * i] = u[8 * i + 2 * t] * scale;
      dst[dOff + 2 * i + 1] = u[8 * i + 2 * t + 1] * scale;
    }
  }
}
