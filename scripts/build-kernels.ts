/**
 * npm run build:kernels (also run by `npm install` through "prepare"): compiles the
 * AssemblyScript SIMD kernels in worker/dsp/wasm/assembly/ to worker/dsp/wasm/build/kernels.wasm.
 * Without the file the engine runs its JavaScript kernels (same results to rounding, slower) and
 * says so once on stderr. tests/dsp/simd-kernels.test.ts fails when the file was not built from its current
 * sources (a hash of them is written beside it), so a kernel edited without a rebuild cannot pass unnoticed.
 */
import fs from 'node:fs';
import { compileKernels, KERNELS_SOURCE_DIR, KERNELS_SOURCES_HASH_PATH, KERNELS_WASM_PATH } from './compile-kernels.js';
import { kernelSourcesHash } from './kernel-sources-hash.js';

try {
  const started = Date.now();
  const bytes = await compileKernels();
  fs.mkdirSync(new URL('.', KERNELS_WASM_PATH), { recursive: true });
  fs.writeFileSync(KERNELS_WASM_PATH, bytes);
  fs.writeFileSync(KERNELS_SOURCES_HASH_PATH, `${kernelSourcesHash(KERNELS_SOURCE_DIR)}\n`);
  console.log(`build:kernels: wrote ${KERNELS_WASM_PATH.pathname} (${bytes.length} bytes, ${Date.now() - started} ms)`);
} catch (err) {
  const text = err instanceof Error ? err.message : String(err);
  console.error(`build:kernels: could not compile the SIMD kernels (${text}).`);
  console.error('The engine will use its JavaScript kernels: same results, slower. Fix the error above and run `npm run build:kernels`.');
  process.exitCode = process.env.CI ? 1 : 0;
}
