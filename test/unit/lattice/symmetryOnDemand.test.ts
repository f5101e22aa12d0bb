/**
 * The CLI makes the symmetry library usable without compiling it (prepareSymmetryOnDemand): its WebAssembly is
 * compiled on the library's first use, once, and not at all by work that never asks for it (the cubic operations
 * of valley counts are found without it). Run in a fresh worker thread (the library's state is per thread), with
 * WebAssembly's compile entry points counted.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';

const ROOT = join(__dirname, '../../..');
const SYMMETRY = join(ROOT, 'src/core/lattice/symmetry.ts');

const WORKER = `
const { parentPort } = require('node:worker_threads');
// Only the symmetry library's module is counted (the TypeScript loader may compile WebAssembly of its own).
const size = require('node:fs').statSync(require.resolve('@spglib/moyo-wasm/moyo_wasm_bg.wasm', { paths: [${JSON.stringify(ROOT)}] })).size;
let compiles = 0;
const count = (bytes) => { if (bytes.byteLength === size) compiles++; };
const Module = WebAssembly.Module;
WebAssembly.Module = function (bytes) { count(bytes); return new Module(bytes); };
WebAssembly.Module.prototype = Module.prototype;
const compile = WebAssembly.compile;
WebAssembly.compile = (bytes) => { count(bytes); return compile(bytes); };
require('tsx/cjs/api').register();
const sym = require(${JSON.stringify(SYMMETRY)});
const a = 5.431;
const si = { lattice: [[0, a / 2, a / 2], [a / 2, 0, a / 2], [a / 2, a / 2, 0]], species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
(async () => {
  const out = { readyBefore: sym.symmetryReady() };
  await sym.prepareSymmetryOnDemand();
  out.readyAfterPrepare = sym.symmetryReady();
  out.compilesAfterPrepare = compiles;
  out.operationsWithout = sym.operationSymmetry(si).pointGroup.length;
  out.compilesAfterOperations = compiles;
  const s = sym.crystalSymmetry(si);
  out.spaceGroup = s.spaceGroup;
  out.operations = s.rotations.length;
  out.compilesAfterUse = compiles;
  out.moduleKept = sym.symmetryCompiledModule() instanceof Module;
  await sym.ensureSymmetryReady();
  sym.crystalSymmetry({ ...si, positions: new Float64Array([0, 0, 0, 0.26, 0.25, 0.25]) });
  out.compilesAtEnd = compiles;
  parentPort.postMessage(out);
})().catch((e) => parentPort.postMessage({ error: String(e) }));
`;

describe('symmetry library compiled on first use', function () {
  this.timeout(60000);

  it('ready after prepare without compiling; compiled once, on first use, with the same answers', async () => {
    const w = new Worker(WORKER, { eval: true });
    const got = await new Promise<Record<string, unknown>>((resolve, reject) => {
      w.once('message', resolve);
      w.once('error', reject);
    });
    await w.terminate();
    assert.equal(got.error, undefined);
    assert.equal(got.readyBefore, false);
    assert.equal(got.readyAfterPrepare, true);
    assert.equal(got.compilesAfterPrepare, 0);
    // Diamond's point group m-3m: 48 operations (International Tables Vol. A), found without the library.
    assert.equal(got.operationsWithout, 48);
    assert.equal(got.compilesAfterOperations, 0);
    // International Tables Vol. A: diamond Si is Fd-3m, No. 227, 48 operations in the primitive cell.
    assert.equal(got.spaceGroup, 227);
    assert.equal(got.operations, 48);
    assert.equal(got.compilesAfterUse, 1);
    assert.equal(got.moduleKept, true);
    assert.equal(got.compilesAtEnd, 1);
  });
});
