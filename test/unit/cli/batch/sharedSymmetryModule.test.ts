/**
 * A batch worker is started with the WebAssembly module its parent compiled (the symmetry library's), and uses
 * that module instead of compiling the bytes again; the analysis in the worker is the same as in this thread.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { ensureSymmetryReady, symmetryCompiledModule } from '../../../../src/core/lattice/symmetry';

const RUNTIME = join(__dirname, '../../../../src/core/lattice/moyoRuntime.ts');
const SYMMETRY = join(__dirname, '../../../../src/core/lattice/symmetry.ts');

/** A worker (TypeScript through tsx) that loads the symmetry library from the module it was given and reports. */
const WORKER = `
const { parentPort, workerData } = require('node:worker_threads');
require('tsx/cjs/api').register();
const runtime = require(${JSON.stringify(RUNTIME)});
const { ensureSymmetryReady, crystalSymmetry } = require(${JSON.stringify(SYMMETRY)});
ensureSymmetryReady(workerData.module).then(() => {
  const a = 5.431;
  const s = crystalSymmetry({ lattice: [[0, a / 2, a / 2], [a / 2, 0, a / 2], [a / 2, a / 2, 0]], species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
  parentPort.postMessage({ usedGiven: runtime.moyoCompiledModule() === workerData.module, spaceGroup: s.spaceGroup, operations: s.rotations.length });
}, (e) => parentPort.postMessage({ error: String(e) }));
`;

describe('symmetry module shared with batch workers', function () {
  this.timeout(60000);

  it('the compiled module crosses to a worker, which uses it as given', async () => {
    await ensureSymmetryReady();
    const module = symmetryCompiledModule();
    assert.ok(module instanceof WebAssembly.Module, 'in Node the compiled module is kept');
    const w = new Worker(WORKER, { eval: true, workerData: { module } });
    const got = await new Promise<{ usedGiven?: boolean; spaceGroup?: number; operations?: number; error?: string }>((resolve, reject) => {
      w.once('message', resolve);
      w.once('error', reject);
    });
    await w.terminate();
    assert.equal(got.error, undefined);
    assert.equal(got.usedGiven, true);
    // International Tables Vol. A: diamond Si is Fd-3m, No. 227, 48 operations in the primitive cell.
    assert.equal(got.spaceGroup, 227);
    assert.equal(got.operations, 48);
  });
});
