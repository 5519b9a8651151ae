// Nullsmith SIMD kernels (AssemblyScript, compiled to WebAssembly with 128-bit SIMD by
// scripts/build-kernels.mjs). Each export mirrors a JavaScript kernel in worker/dsp/ that stays
// the tested reference (tests/dsp/simd-kernels.test.ts compares them).
//
// Why WebAssembly here: f64x2 lanes do two of the four real multiply-adds of a complex
// multiply-add in one instruction, which scalar JavaScript cannot express. Measured on the
// standard job's sizes (N = 32), CPU per window-bin, JavaScript → WebAssembly: group Gram
// (covariance) 57 → 31 µs, Q = R_L⁻¹ and Q² 65 → 19 µs, Householder reduction of the
// eigenvalue step 72 → 38 µs with the QL part (JavaScript, 17 µs), Cholesky 21 → 7.5 µs,
// four-beam substitutions (91 beams) 253 → 89 µs (bench/dsp-engine.ts header). No
// general-purpose npm package offers SIMD complex kernels for these shapes, hence our own.
//
// All pointers are byte offsets into this module's memory. Complex matrices are interleaved
// (re, im), row-major, N×N (16·N bytes per row), as hermitian-cholesky.ts.

export { gramUpper } from './gram';
export { invertLower, gramOfInverse, squareOfHermitian } from './loaded-inverse';
export { tridiagonalize } from './householder';
export { choleskyFactor } from './cholesky';
export { fourBeamFactor, solveFour } from './four-beam';
