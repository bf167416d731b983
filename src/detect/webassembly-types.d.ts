// The few WebAssembly JavaScript API types the scan kernel uses. Node has the
// API, but its type declarations ship only with TypeScript's DOM library, which
// this package leaves out (it targets Node, not browsers).
declare namespace WebAssembly {
  class Module {
    constructor(bytes: Uint8Array);
  }
  class Instance {
    constructor(module: Module, imports: Record<string, never>);
    readonly exports: Record<string, unknown>;
  }
}
