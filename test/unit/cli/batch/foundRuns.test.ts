/** A run found by the search is read with the file and reader found then, giving the line reading it by path gives. */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { findRuns, SEARCH_CONCURRENCY } from '../../../../src/cli/batch/findRuns';
import type { FileAccessor } from '../../../../src/core/io/fileAccessor';
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

  it('searches several folders at once (a slow file system), finding the same runs in the same order, never more than the limit at once', async () => {
    const root = mkdtempSync(join(tmpdir(), 'vs-found-'));
    const names: string[] = [];
    for (let g = 0; g < 3; g++) {
      for (let i = 0; i < 12; i++) {
        const name = join(`group-${g}`, `run-${String(i).padStart(2, '0')}`);
        writeTinyRun(join(root, name), { gap_eV: 0.5 + 0.01 * i });
        names.push(name);
      }
    }
    mkdirSync(join(root, 'group-1', 'empty-folder'));
    // Every call waits 5 ms, as a network file system's round trip would; count the calls in flight.
    let inFlight = 0;
    let most = 0;
    const slow = <T>(f: () => Promise<T>): Promise<T> => {
      inFlight++;
      most = Math.max(most, inFlight);
      return new Promise<T>((resolve, reject) =>
        setTimeout(
          () =>
            void f()
              .then(resolve, reject)
              .finally(() => inFlight--),
          5,
        ),
      );
    };
    const fs: FileAccessor = {
      ...nodeFileAccessor,
      stat: (p) => slow(() => nodeFileAccessor.stat(p)),
      list: (d) => slow(() => nodeFileAccessor.list(d)),
      readHead: (p, n) => slow(() => nodeFileAccessor.readHead(p, n)),
    };
    const t0 = Date.now();
    const found = await findRuns(fs, [root]);
    const took = Date.now() - t0;
    assert.deepEqual(
      found.runs,
      [...names].sort().map((n) => join(root, n)),
    );
    assert.ok(most >= 4, `calls in flight at most ${most}: the search did not overlap folders`);
    // One look at a folder may itself overlap a call or two (locateRun), hence the margin over the limit.
    assert.ok(most <= 2 * SEARCH_CONCURRENCY, `calls in flight at most ${most}`);
    assert.deepEqual(found.notes, []);
    // Not a timing assertion: the elapsed time is printed for whoever reads the log.
    console.log(`      (36 runs behind 5 ms per call: ${took} ms, at most ${most} calls at once)`);
  });
});
