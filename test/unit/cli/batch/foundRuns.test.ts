/** A run found by the search is read with the file and reader found then, giving the line reading it by path gives. */
import assert from 'node:assert/strict';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { findRuns } from '../../../../src/cli/batch/findRuns';
import { runTask, type BatchResult } from '../../../../src/cli/batch/tasks';
import { nodeFileAccessor } from '../../../../src/cli/nodeFileAccessor';
import { ensureSymmetryReady } from '../../../../src/core/lattice/symmetry';
import { writeTinyRun } from '../../annotations/tinyRun';

const lineOf = (r: BatchResult): Record<string, unknown> =>
  JSON.parse((r as Extract<BatchResult, { kind: 'analyze' }>).line) as Record<string, unknown>;

describe('batch: runs found by the search', function () {
  this.timeout(60000);
  before(() => ensureSymmetryReady());

  it('keep the eigenvalue file and its reader, and the line equals the one of the run read by its path', async () => {
    const root = mkdtempSync(join(tmpdir(), 'vs-found-'));
    const dir = join(root, 'run-a');
    writeTinyRun(dir, { gap_eV: 1.1 });
    const found = await findRuns(nodeFileAccessor, [root]);
    assert.equal(found.runs.length, 1);
    const run = found.runs[0]!;
    const f = found.files.get(run);
    assert.ok(f && /EIGENVAL$/.test(f.file), JSON.stringify(f));
    assert.equal(f.readerId, 'vasp-eigenval');
    const viaFound = lineOf(await runTask({ kind: 'analyze', path: run, settings: {}, read: {}, found: f }));
    const viaPath = lineOf(await runTask({ kind: 'analyze', path: run, settings: {}, read: {} }));
    assert.equal(viaFound.error, undefined);
    // The tight-binding model's gap is the E_g written (tinyRun.ts).
    assert.ok(Math.abs((viaFound.gap as { eV: number }).eV - 1.1) < 2e-6);
    assert.deepEqual(viaFound, viaPath);
  });

  it('a reader id that names no reader falls back to finding the file again', async () => {
    const root = mkdtempSync(join(tmpdir(), 'vs-found-'));
    const dir = join(root, 'run-b');
    writeTinyRun(dir, { gap_eV: 0.7 });
    const line = lineOf(
      await runTask({
        kind: 'analyze',
        path: dir,
        settings: {},
        read: {},
        found: { file: join(dir, 'EIGENVAL'), readerId: 'no-such-reader' },
      }),
    );
    assert.ok(Math.abs((line.gap as { eV: number }).eV - 0.7) < 2e-6);
  });
});
