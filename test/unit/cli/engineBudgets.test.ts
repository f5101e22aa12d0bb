/** The CLI's engine budgets: applied only on the engine versions they were checked on. */
import assert from 'node:assert/strict';
import { CLI_INTERRUPT_BUDGET, CLI_WASM_TIERING_BUDGET, raiseEngineBudgets } from '../../../src/cli/engineBudgets';

describe('CLI engine budgets', () => {
  it('are left alone on an engine they were not checked on', () => {
    assert.equal(raiseEngineBudgets('9.4.146.26'), false);
    assert.equal(raiseEngineBudgets('14.0.0'), false);
    assert.equal(raiseEngineBudgets('not a version'), false);
  });

  it('are applied on this runtime (Node 20–24) and lie above the engine defaults', () => {
    // Node 20–24 ship V8 11–13 (nodejs.org release notes); the defaults are 1 800 000 (WebAssembly tiering) and
    // 67 584 (interrupt budget, V8 11), as `node --v8-options` prints them.
    const major = Number(process.versions.v8.split('.')[0]);
    assert.equal(raiseEngineBudgets(), major >= 11 && major <= 13);
    assert.ok(CLI_WASM_TIERING_BUDGET > 100 * 1_800_000);
    assert.ok(CLI_INTERRUPT_BUDGET > 10 * 67_584);
  });
});
