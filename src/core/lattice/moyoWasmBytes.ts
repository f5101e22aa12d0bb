/**
 * The crystal-symmetry library's WebAssembly bytes, inlined by esbuild's `binary` loader, so the CLI, both
 * extension-host bundles (node and web) and workers carry them without fetching a file. Imported lazily
 * (see moyoRuntime.ts): outside a bundle, Node cannot import a .wasm file as bytes.
 */
import bytes from '@spglib/moyo-wasm/moyo_wasm_bg.wasm';

export const MOYO_WASM_BYTES: Uint8Array = bytes;
