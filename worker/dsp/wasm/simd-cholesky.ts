/**
 * The SIMD complex Cholesky (assembly/cholesky.ts) with its own kernel instance: the matrix is
 * copied into the instance's memory, factored there, and the factor L is read through `l`, a
 * view that stays valid for the object's life. Same contract as hermitian-cholesky.ts
 * choleskyFactor, which stays the reference (tests/dsp/simd-kernels.test.ts).
 */
import { PIVOT_RELATIVE_FLOOR } from '../hermitian-cholesky.js';
import { instantiateKernels, kernelView, type KernelExports } from './simd-kernels.js';

export class SimdCholesky {
  /** The factor L of the last successful call (lower triangle; the strict upper stays zero). */
  readonly l: Float64Array;
  private readonly a: Float64Array;
  private readonly kernels: KernelExports;
  private readonly n: number;

  private constructor(kernels: KernelExports, n: number) {
    const m = 2 * n * n;
    this.kernels = kernels;
    this.n = n;
    this.a = kernelView(kernels, 0, m);
    this.l = kernelView(kernels, 8 * m, m);
  }

  /** A factorizer for N×N matrices, or null when the JavaScript kernels are in use. */
  static create(n: number): SimdCholesky | null {
    const kernels = instantiateKernels(16 * 2 * n * n);
    return kernels ? new SimdCholesky(kernels, n) : null;
  }

  /** Factors a[aOff…] + δI (lower triangle read) into `l`; false when not positive definite. */
  factor(a: Float64Array, aOff: number, delta: number): boolean {
    const n = this.n;
    const dst = this.a;
    // The lower triangle by loop, not set(subarray): no view object per call on this
    // per-(bin, window) path (bench/dsp-engine.ts: 7.6 µs with the copy against 5.3 µs with
    // set(subarray); a flat loop over the whole matrix took 10.7 µs).
    for (let i = 0; i < n; i++) {
      const row = 2 * i * n;
      for (let j = row; j <= row + 2 * i + 1; j++) dst[j] = a[aOff + j];
    }
    return this.kernels.choleskyFactor(0, 8 * dst.length, n, delta, PIVOT_RELATIVE_FLOOR) === 1;
  }
}
