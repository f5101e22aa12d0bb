/**
 * The CLI's engine budgets: a short process must not pay for optimising code it will barely run again.
 *
 * Measured (CPU profiles and timings on this machine, Node 20):
 * - WebAssembly: after a few symmetry calls the runtime starts optimising the hottest WebAssembly functions on
 *   background threads, and the process waits for those compilations before it can exit: 150–170 ms on a small
 *   run that otherwise takes 0.15 s. Raising the WebAssembly tiering budget keeps the symmetry code on the
 *   baseline compiler in ordinary runs; a run heavy enough to spend that budget still gets the optimised code.
 * - JavaScript: with the engine's default interrupt budget (how much bytecode a function runs before the
 *   runtime considers optimising it) the optimising compiler took about half of all CPU of `analyze --jsonl`
 *   over 200 small runs, compiling functions that each run only briefly per file, and in every worker thread
 *   again (optimised code is per thread). With a budget of 1 000 000 the same batch took 0.64 s of CPU instead of
 *   1.05 s with one job (0.60 s wall instead of 0.76 s), and single large runs were no slower (20 000 k × 40
 *   bands: 0.37 s CPU instead of 0.45–0.58 s): loops that run long are still optimised, a little later.
 *
 * V8 flags are process-wide (worker threads share them) and these are engine options, not a public API: they
 * are set only for the engine versions they were checked on (Node 20–24 carry V8 11–13), and an engine that
 * refuses one is left as it is.
 */
import { setFlagsFromString } from 'node:v8';

/** WebAssembly budget per function before optimisation; the engine's default is 1 800 000 (node --v8-options). */
export const CLI_WASM_TIERING_BUDGET = 1_000_000_000;
/** JavaScript interrupt budget per function; the engine's default is 67 584 on V8 11 (node --v8-options). */
export const CLI_INTERRUPT_BUDGET = 1_000_000;

/** Sets both budgets for this process; false when the engine is not one they were checked on or refused one. */
export function raiseEngineBudgets(v8Version: string = process.versions.v8): boolean {
  const major = Number(v8Version.split('.')[0]);
  if (!(major >= 11 && major <= 13)) return false;
  try {
    setFlagsFromString(`--wasm-tiering-budget=${CLI_WASM_TIERING_BUDGET}`);
    setFlagsFromString(`--interrupt-budget=${CLI_INTERRUPT_BUDGET}`);
    return true;
  } catch {
    return false;
  }
}
