import { SeededRandom } from './random.js';

/** Random Hermitian positive-definite matrix A = (1/K)·Σ x·xᴴ + εI, flat interleaved. */
export function randomHermitianPd(rng: SeededRandom, n: number, k: number, eps = 0): Float64Array {
  const x = new Float64Array(2 * n);
  const a = new Float64Array(2 * n * n);
  for (let s = 0; s < k; s++) {
    rng.complexNormal(x);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        a[2 * (i * n + j)] += (x[2 * i] * x[2 * j] + x[2 * i + 1] * x[2 * j + 1]) / k;
        a[2 * (i * n + j) + 1] += (x[2 * i + 1] * x[2 * j] - x[2 * i] * x[2 * j + 1]) / k;
      }
    }
  }
  for (let i = 0; i < n; i++) a[2 * (i * n + i)] += eps;
  return a;
}
