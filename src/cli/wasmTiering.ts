/**
 * A short CLI run must not pay for optimising the crystal-symmetry WebAssembly it barely uses.
 *
 * Measured (CPU profile and timings of `analyze --json` on this machine, Node 20): after a few symmetry calls
 * the runtime starts optimising the hottest WebAssembly functions on background threads, and the process
 * waits for those compilations before it can exit: 150–170 ms on a small run that otherwise takes 0.15 s,
 * more than the analysis itself. Raising the runtime's tiering budget (how much code runs before a function
 * is optimised) keeps the symmetry code on the baseline compiler in ordinary runs; a run heavy enough to spend
 * that budget still gets the optimised code.
 *
 * V8 flags are process-wide and this one is an engine option, not a public API: it is set only for the
 * engine versions it was checked on (Node 20–24 carry V8 11–13), and an engine that refuses it is left as is.
 */
import { setFlagsFromString } from 'node:v8';

/** Budget per function before optimisation; the engine's default is 1 800 000 (node --v8-options). */
export const CLI_WASM_TIERING_BUDGET = 1_000_000_000;

export function raiseWasmTieringBudget(v8Version: string = process.versions.v8): boolean {
  const major = Number(v8Version.split('.')[0]);
  if (!(major >= 11 && major <= 13)) return false;
  try {
    setFlagsFromString(`--wasm-tiering-budget=${CLI_WASM_TIERING_BUDGET}`);
    return true;
  } catch {
    return false;
  }
}
