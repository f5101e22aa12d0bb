/** The CLI's engine setting for the symmetry WebAssembly: applied only on the engine versions it was checked on. */
import assert from 'node:assert/strict';
import { CLI_WASM_TIERING_BUDGET, raiseWasmTieringBudget } from '../../../src/cli/wasmTiering';

describe('CLI WebAssembly tiering budget', () => {
  it('is left alone on an engine it was not checked on', () => {
    assert.equal(raiseWasmTieringBudget('9.4.146.26'), false);
    assert.equal(raiseWasmTieringBudget('14.0.0'), false);
    assert.equal(raiseWasmTieringBudget('not a version'), false);
  });

  it('is applied on this runtime (Node 20–24) and is far above the engine default', () => {
    // Node 20–24 ship V8 11–13 (nodejs.org release notes); the default budget is 1 800 000 (node --v8-options).
    const major = Number(process.versions.v8.split('.')[0]);
    assert.equal(raiseWasmTieringBudget(), major >= 11 && major <= 13);
    assert.ok(CLI_WASM_TIERING_BUDGET > 100 * 1_800_000);
  });
});
