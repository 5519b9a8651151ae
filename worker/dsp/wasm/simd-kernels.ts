/**
 * The compiled SIMD kernels (worker/dsp/wasm/assembly/ → build/kernels.wasm, built by
 * `npm run build:kernels`, which `npm install` runs). Each user takes its own instance, whose
 * memory it sizes once, so its Float64Array views never detach.
 *
 * Without the file (or with NULLSMITH_KERNELS=js, for A/B benchmarks and the reference tests)
 * every caller keeps its JavaScript kernel: same results to rounding, slower; a missing file is
 * reported once on stderr. The choice holds for the whole process, so every window of a job (and
 * of its resumed run on the same installation) is computed the same way; run.json records it.
 */
import fs from 'node:fs';

export interface KernelExports {
  readonly memory: WebAssembly.Memory;
  gramUpper(pr: number, pi: number, out: number, n: number, count: number): void;
  invertLower(l: number, t: number, n: number): void;
  gramOfInverse(t: number, q: number, n: number): void;
  squareOfHermitian(q: number, q2: number, n: number): void;
  tridiagonalize(a: number, v: number, p: number, d: number, e: number, n: number): void;
  choleskyFactor(a: number, l: number, n: number, delta: number, floorRel: number): number;
  fourBeamFactor(lower: number, upper: number, invDiag: number, n: number): void;
  solveFour(lower: number, upper: number, invDiag: number, v4: number, z: number, u: number, norms: number, n: number): void;
}

export type KernelKind = 'wasm-simd' | 'javascript';

const WASM_URL = new URL('./build/kernels.wasm', import.meta.url);
let compiled: WebAssembly.Module | null | undefined;

function kernelModule(): WebAssembly.Module | null {
  if (compiled !== undefined) return compiled;
  compiled = null;
  if (process.env.NULLSMITH_KERNELS === 'js') return compiled;
  try {
    compiled = new WebAssembly.Module(fs.readFileSync(WASM_URL));
  } catch (err) {
    const why = err instanceof Error ? err.message : String(err);
    process.stderr.write(`Nullsmith: SIMD kernels not loaded (${why}); using the JavaScript kernels (same results, slower). Run \`npm run build:kernels\` to build them.\n`);
  }
  return compiled;
}

/** Which kernels this process uses. */
export function kernelKind(): KernelKind {
  return kernelModule() ? 'wasm-simd' : 'javascript';
}

/** A new kernel instance with at least `bytes` of memory, or null when the JavaScript kernels are in use. */
export function instantiateKernels(bytes: number): KernelExports | null {
  const mod = kernelModule();
  if (!mod) return null;
  const exports = new WebAssembly.Instance(mod, {}).exports as unknown as KernelExports;
  const pages = Math.ceil(bytes / 65536) - exports.memory.buffer.byteLength / 65536;
  if (pages > 0) exports.memory.grow(pages);
  return exports;
}

/** A Float64Array view of `length` doubles at byte offset `at` of the instance's memory. */
export function kernelView(kernels: KernelExports, at: number, length: number): Float64Array {
  return new Float64Array(kernels.memory.buffer, at, length);
}
