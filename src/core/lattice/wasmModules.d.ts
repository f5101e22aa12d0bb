/**
 * WebAssembly files imported as bytes. esbuild's `binary` loader (esbuild.mjs) turns
 * `import bytes from 'x.wasm'` into a Uint8Array inlined in the bundle.
 */
declare module '*.wasm' {
  const bytes: Uint8Array;
  export default bytes;
}
