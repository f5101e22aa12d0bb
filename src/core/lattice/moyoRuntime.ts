/**
 * Loading of the crystal-symmetry library (`@spglib/moyo-wasm`, the WebAssembly build of moyo, a
 * general-purpose symmetry finder) exactly once, and typed access to the few functions Valleyscope uses.
 *
 * Initialisation is asynchronous (`WebAssembly.instantiate`) on purpose: browsers refuse synchronous
 * compilation of modules this size on a page's main thread, and the same code runs in the webview, the web
 * extension host, workers and Node.
 */
import initMoyo, { analyze_cell, space_group_type } from '@spglib/moyo-wasm';
import type { MoyoDataset, MoyoSpaceGroupType } from '@spglib/moyo-wasm';

export type { MoyoDataset, MoyoSpaceGroupType };

let ready = false;
let loading: Promise<void> | null = null;

/** Bytes of the WebAssembly module: inlined by the bundler, or read from the installed package in Node. */
async function wasmBytes(): Promise<Uint8Array> {
  try {
    const m = await import('./moyoWasmBytes');
    if (m.MOYO_WASM_BYTES instanceof Uint8Array && m.MOYO_WASM_BYTES.length > 0) return m.MOYO_WASM_BYTES;
  } catch {
    // Not bundled (tests and development runs under tsx): fall through to the installed package.
  }
  const fromPackage = readFromInstalledPackage();
  if (fromPackage) return fromPackage;
  throw new Error('the crystal-symmetry module (@spglib/moyo-wasm) could not be loaded in this environment');
}

interface NodeProcessLike {
  cwd(): string;
  argv: string[];
  getBuiltinModule?: (id: string) => object | undefined;
}
interface NodeFsLike {
  readFileSync(path: string): Uint8Array;
}
interface NodeModuleLike {
  createRequire(path: string): { resolve(id: string): string };
}

/**
 * Unbundled Node only (mocha + tsx, `tsx src/cli/main.ts`): read the .wasm from node_modules. Uses Node's
 * built-ins through `process.getBuiltinModule` at run time, so no bundle for the web ever references them;
 * bundles never reach this point because the bytes are inlined.
 */
function readFromInstalledPackage(): Uint8Array | null {
  const proc = (globalThis as { process?: NodeProcessLike }).process;
  if (!proc || typeof proc.getBuiltinModule !== 'function') return null;
  const fs = proc.getBuiltinModule('node:fs') as NodeFsLike | undefined;
  const mod = proc.getBuiltinModule('node:module') as NodeModuleLike | undefined;
  if (!fs || !mod) return null;
  const bases = [`${proc.cwd()}/`];
  if (proc.argv[1]) bases.push(proc.argv[1]);
  for (const base of bases) {
    try {
      return fs.readFileSync(mod.createRequire(base).resolve('@spglib/moyo-wasm/moyo_wasm_bg.wasm'));
    } catch {
      // try the next base
    }
  }
  return null;
}

/** Load the WebAssembly module once; later calls return the same promise. */
export function ensureMoyoReady(): Promise<void> {
  if (ready) return Promise.resolve();
  if (!loading) {
    loading = (async () => {
      const bytes = await wasmBytes();
      await initMoyo({ module_or_path: bytes });
      ready = true;
    })();
    loading.catch(() => {
      loading = null; // allow a later retry
    });
  }
  return loading;
}

export function moyoReady(): boolean {
  return ready;
}

/** The library's dataset for a cell (operations are given in the basis of the cell passed in). */
export function moyoAnalyze(cellJson: string, symprec: number): MoyoDataset {
  return analyze_cell(cellJson, symprec, 'Standard');
}

export function moyoSpaceGroupType(num: number): MoyoSpaceGroupType {
  return space_group_type(num);
}
