/** The worker pool: results in task order whatever the timing, and a worker that dies costs only the run it was on. */
import assert from 'node:assert/strict';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { runPool } from '../../../../src/cli/batch/pool';
import type { BatchResult, BatchTask } from '../../../../src/cli/batch/tasks';
import { writeTinyRun } from '../../annotations/tinyRun';

describe('batch worker pool', function () {
  this.timeout(120000);
  const root = mkdtempSync(join(tmpdir(), 'vs-pool-'));
  const gaps = [0.6, 0.9, 1.2, 1.5, 1.8, 2.1];
  const tasks: BatchTask[] = gaps.map((g, i) => {
    const dir = join(root, `run-${i}`);
    writeTinyRun(dir, { gap_eV: g });
    return { kind: 'analyze', path: dir, settings: {}, read: {} };
  });

  it('a worker that dies fails the run it was on, with the reason; every other run still gets its line, in order', async () => {
    // A worker that exits as soon as it is given its first task.
    const dying = new Worker("require('node:worker_threads').parentPort.on('message', () => process.exit(7));", { eval: true });
    const got: [number, BatchResult][] = [];
    await runPool(tasks, 2, (r, i) => got.push([i, r]), undefined, [dying]);
    assert.deepEqual(
      got.map(([i]) => i),
      [0, 1, 2, 3, 4, 5],
    );
    const failed = got.filter(([, r]) => r.failed);
    assert.equal(failed.length, 1);
    const line = JSON.parse((failed[0]![1] as Extract<BatchResult, { kind: 'analyze' }>).line) as { error: string };
    assert.match(String(line.error), /worker processing .*run-0 stopped \(exit code 7\)/);
    // The others: the tight-binding model's gap is the E_g written (tinyRun.ts), in task order.
    for (const [i, r] of got.filter(([, x]) => !x.failed)) {
      const gap = (JSON.parse((r as Extract<BatchResult, { kind: 'analyze' }>).line) as { gap: { eV: number } }).gap;
      assert.ok(Math.abs(gap.eV - gaps[i]!) < 2e-6, `run ${i}: ${gap.eV}`);
    }
  });
});
