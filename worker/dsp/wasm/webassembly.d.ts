/**
 * The part of the WebAssembly JavaScript API the kernel loader uses. Node has it at run time,
 * but @types/node 20 does not declare it and the server's tsconfig has no DOM library.
 */
declare namespace WebAssembly {
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Instance {
    constructor(module: Module, imports: object);
    readonly exports: Record<string, unknown>;
  }
  class Memory {
    readonly buffer: ArrayBuffer;
    grow(pages: number): number;
  }
}
