/**
 * Runs handed to the pool while the search goes on: each result goes out once, in the order given when the
 * search ends (path order), whatever order the runs were found and finished in; a failed search drops the rest.
 */
import assert from 'node:assert/strict';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runPool } from '../../../../src/cli/batch/pool';
import { TaskFeed } from '../../../../src/cli/batch/taskFeed';
import { findRuns } from '../../../../src/cli/batch/findRuns';
import { nodeFileAccessor } from '../../../../src/cli/nodeFileAccessor';
import type { BatchResult, BatchTask } from '../../../../src/cli/batch/tasks';
import { ensureSymmetryReady } from '../../../../src/core/lattice/symmetry';
import { writeTinyRun } from '../../annotations/tinyRun';

const gapOf = (r: BatchResult): number =>
  (JSON.parse((r as Extract<BatchResult, { kind: 'analyze' }>).line) as { gap: { eV: number } }).gap.eV;

describe('batch: a feed of tasks that arrive while the pool runs', function () {
  this.timeout(120000);
  before(() => ensureSymmetryReady());
  const root = mkdtempSync(join(tmpdir(), 'vs-feed-'));
  // Gaps of the tight-binding model written by tinyRun.ts: each run's line carries the E_g written.
  const gaps = [0.7, 1.0, 1.3, 1.6, 1.9];
  const tasks: BatchTask[] = gaps.map((g, i) => {
    const dir = join(root, `run-${i}`);
    writeTinyRun(dir, { gap_eV: g });
    return { kind: 'analyze', path: dir, settings: {}, read: {} };
  });

  it('refuses an order that is not a permutation of its tasks, and pushes after closing', () => {
    const f = new TaskFeed();
    f.push(tasks[0]!);
    f.push(tasks[1]!);
    assert.throws(() => f.close([0, 0]), /permutation/);
    assert.throws(() => f.close([0, 2]), /permutation/);
    f.close([1, 0]);
    assert.deepEqual(f.order, [1, 0]);
    assert.throws(() => f.push(tasks[2]!), /after close/);
  });

  for (const jobs of [1, 2]) {
    it(`--jobs ${jobs}: tasks pushed over time, closed with a reversed order, come out once each in that order`, async () => {
      const feed = new TaskFeed();
      const got: [number, BatchResult][] = [];
      const pool = runPool(feed, jobs, (r, i) => got.push([i, r]));
      for (const t of tasks) {
        await new Promise((r) => setTimeout(r, 20));
        feed.push(t);
      }
      // Nothing may go out before the order is known.
      assert.equal(got.length, 0);
      feed.close([4, 3, 2, 1, 0]);
      await pool;
      assert.deepEqual(
        got.map(([i]) => i),
        [4, 3, 2, 1, 0],
      );
      for (const [i, r] of got) assert.ok(Math.abs(gapOf(r) - gaps[i]!) < 2e-6, `run ${i}: ${gapOf(r)}`);
    });
  }

  it('a cancelled feed ends the pool without handing anything on', async () => {
    const feed = new TaskFeed();
    const got: number[] = [];
    const pool = runPool(feed, 2, (_r, i) => got.push(i));
    feed.push(tasks[0]!);
    feed.push(tasks[1]!);
    feed.cancel();
    await pool;
    assert.deepEqual(got, []);
  });

  it('an empty feed, closed, ends the pool', async () => {
    const feed = new TaskFeed();
    const pool = runPool(feed, 2, () => assert.fail('no result expected'));
    feed.close();
    await pool;
  });

  it('the search tells of each run once as it is found, and returns them all in path order', async () => {
    const heard: string[] = [];
    const found = await findRuns(nodeFileAccessor, [root, join(root, 'run-2')], (run) => heard.push(run));
    assert.deepEqual([...heard].sort(), found.runs);
    assert.equal(new Set(heard).size, heard.length);
    assert.equal(found.runs.length, gaps.length);
  });

  it('a named path that does not exist fails the search before any run is told of', async () => {
    const heard: string[] = [];
    await assert.rejects(
      findRuns(nodeFileAccessor, [root, join(root, 'no-such-run')], (run) => heard.push(run)),
      /no such file or folder/,
    );
    assert.deepEqual(heard, []);
  });
});
