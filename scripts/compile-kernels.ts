/**
 * Compiles worker/dsp/wasm/assembly/index.ts with the AssemblyScript compiler (npm package
 * `assemblyscript`, run in-process: nothing is downloaded) and returns the module's bytes.
 * Flags: 128-bit SIMD on, -O3, no runtime (the kernels never allocate), no assertions.
 */
import { fileURLToPath } from 'node:url';

export const KERNELS_SOURCE_DIR = new URL('../worker/dsp/wasm/assembly/', import.meta.url);
export const KERNELS_WASM_PATH = new URL('../worker/dsp/wasm/build/kernels.wasm', import.meta.url);
export const KERNELS_SOURCES_HASH_PATH = new URL('../worker/dsp/wasm/build/kernels.sources.sha256', import.meta.url);

export async function compileKernels(): Promise<Uint8Array> {
  const asc = await import('assemblyscript/asc');
  const entry = fileURLToPath(new URL('index.ts', KERNELS_SOURCE_DIR));
  let wasm: Uint8Array | undefined;
  let diagnostics = '';
  const { error } = await asc.main(
    [entry, '--outFile', 'kernels.wasm', '--enable', 'simd', '-O3', '--noAssert', '--runtime', 'stub'],
    {
      writeFile: (name: string, contents: Uint8Array | string) => {
        if (name.endsWith('.wasm') && typeof contents !== 'string') wasm = contents;
      },
      stdout: { write: () => true },
      stderr: { write: (s: string | Uint8Array) => { diagnostics += String(s); return true; } },
    } as never,
  );
  if (error) throw new Error(`${error.message}\n${diagnostics}`);
  if (!wasm) throw new Error(`the compiler wrote no .wasm file\n${diagnostics}`);
  return wasm;
}
