/**
 * Loading of the crystal-symmetry library (`@spglib/moyo-wasm`, the WebAssembly build of moyo, a
 * general-purpose symmetry finder) exactly once, and typed access to the few functions Valleyscope uses.
 *
 * Initialisation is asynchronous (`WebAssembly.instantiate`) on purpose: browsers refuse synchronous
 * compilation of modules this size on a page's main thread, and the same code runs in the webview, the web
 * extension host, workers and Node.
 */
import initMoyo, { analyze_cell, initSync, space_group_type } from '@spglib/moyo-wasm';
import type { MoyoDataset, MoyoSpaceGroupType } from '@spglib/moyo-wasm';
import { KeptByKey } from '../keptByKey';

export type { MoyoDataset, MoyoSpaceGroupType };

let ready = false;
let loading: Promise<void> | null = null;
let compiled: WebAssembly.Module | null = null;
/** Node, after prepareMoyoOnDemand: the module's bytes, compiled when the library is first used. */
let waiting: Uint8Array<ArrayBuffer> | null = null;

/**
 * Bytes of the WebAssembly module: inlined by the bundler, or read from the installed package in Node. Both
 * live in an ordinary ArrayBuffer (never a shared one), which is what WebAssembly.compile accepts.
 */
async function wasmBytes(): Promise<Uint8Array<ArrayBuffer>> {
  try {
    const m = await import('./moyoWasmBytes');
    if (m.MOYO_WASM_BYTES instanceof Uint8Array && m.MOYO_WASM_BYTES.length > 0) return m.MOYO_WASM_BYTES as Uint8Array<ArrayBuffer>;
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
  readFileSync(path: string): Uint8Array<ArrayBuffer>;
}
interface NodeModuleLike {
  createRequire(path: string): { resolve(id: string): string };
}

/**
 * Unbundled Node only (mocha + tsx, `tsx src/cli/main.ts`): read the .wasm from node_modules. Uses Node's
 * built-ins through `process.getBuiltinModule` at run time, so no bundle for the web ever references them;
 * bundles never reach this point because the bytes are inlined.
 */
function readFromInstalledPackage(): Uint8Array<ArrayBuffer> | null {
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

/** True in Node (CLI, extension host, worker threads); false in a browser, a webview or the web extension host. */
function inNode(): boolean {
  const proc = (globalThis as { process?: { versions?: { node?: string } } }).process;
  return typeof proc?.versions?.node === 'string';
}

/**
 * Load the WebAssembly module once; later calls return the same promise. `module`: a module already compiled
 * elsewhere (a batch worker gets the one its parent compiled, see moyoCompiledModule), so it is not compiled
 * again.
 *
 * In Node the module is compiled here and instantiated synchronously: the library's own loader asks whether
 * `Response` and `Request` exist, and in Node that question alone loads the runtime's HTTP client (about 20 ms
 * of a CLI run). Browsers keep the library's asynchronous loader.
 */
export function ensureMoyoReady(module?: WebAssembly.Module): Promise<void> {
  if (ready || loadWaiting(module)) return Promise.resolve();
  if (!loading) {
    loading = (async () => {
      if (inNode()) {
        compiled = module ?? (await WebAssembly.compile(await wasmBytes()));
        initSync({ module: compiled });
      } else {
        await initMoyo({ module_or_path: module ?? (await wasmBytes()) });
      }
      ready = true;
    })();
    loading.catch(() => {
      loading = null; // allow a later retry
    });
  }
  return loading;
}

/**
 * Node: read the module's bytes now, and compile them only when the library is first used (a CLI run that never
 * asks for symmetry does not pay for compiling it, about 4 ms of CPU). The library then counts as ready: its
 * first use compiles and instantiates it synchronously, as ensureMoyoReady does in Node. Elsewhere: ensureMoyoReady.
 */
export async function prepareMoyoOnDemand(): Promise<void> {
  if (!inNode() || ready || loading) return ensureMoyoReady();
  waiting ??= await wasmBytes();
}

/** Compile and instantiate the waiting bytes (or use `module`, compiled elsewhere) now; true when that made the library ready. */
function loadWaiting(module?: WebAssembly.Module): boolean {
  if (ready || !waiting) return false;
  compiled = module ?? new WebAssembly.Module(waiting);
  initSync({ module: compiled });
  waiting = null;
  ready = true;
  loading = Promise.resolve();
  return true;
}

/**
 * The compiled WebAssembly module in Node (compiled now if its bytes are waiting; null before they are read, and
 * in browsers): a worker thread given it (postMessage or workerData copy it by reference) skips compiling the
 * same bytes again.
 */
export function moyoCompiledModule(): WebAssembly.Module | null {
  loadWaiting();
  return compiled;
}

/** True when the library can be used synchronously: loaded, or its bytes waiting to be compiled on first use. */
export function moyoReady(): boolean {
  return ready || waiting !== null;
}

/**
 * The library's dataset for a cell (operations are given in the basis of the cell passed in). The library is
 * deterministic: the same input text gives the same dataset, kept for the next caller (the Bravais lattice of
 * label inference and the crystal symmetry of the analysis ask for the same cell; each call also brings the
 * runtime closer to recompiling the module). Bounded; the oldest goes first. Callers must not change it.
 */
export function moyoAnalyze(cellJson: string, symprec: number): MoyoDataset {
  const key = `${symprec} ${cellJson}`;
  return datasets.answer(key, () => {
    loadWaiting();
    return analyze_cell(cellJson, symprec, 'Standard');
  });
}
const datasets = new KeptByKey<MoyoDataset>(16);

export function moyoSpaceGroupType(num: number): MoyoSpaceGroupType {
  loadWaiting();
  return space_group_type(num);
}
