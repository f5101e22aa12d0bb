/**
 * A pool of worker threads for batch commands: each worker takes the next task when it finishes one; results
 * are handed on in the order of the tasks (not of completion), so the output does not depend on --jobs or on
 * timing. With one job (or one task) the tasks run in this thread, one after another.
 */
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { symmetryCompiledModule } from '../../core/lattice/symmetry';
import { runTask, type BatchResult, type BatchTask } from './tasks';

/** What a worker is started with: this thread's compiled symmetry module, so the worker neither compiles it nor optimises its code again. */
export interface WorkerStart {
  symmetryModule: WebAssembly.Module | null;
}

export interface PoolProgress {
  done: number;
  failed: number;
  total: number;
}

/** The worker script: the bundled one beside the CLI bundle, or the TypeScript source through tsx (tests, scripts). */
function startWorker(): Worker {
  const workerData: WorkerStart = { symmetryModule: symmetryCompiledModule() };
  if (__filename.endsWith('.ts')) {
    const entry = join(__dirname, 'worker.ts');
    return new Worker(`require('tsx/cjs/api').register(); require(${JSON.stringify(entry)});`, { eval: true, workerData });
  }
  return new Worker(join(__dirname, 'batchWorker.js'), { workerData });
}

function stoppedResult(task: BatchTask, why: string): BatchResult {
  const error = `the worker processing ${task.path} stopped (${why}); the other runs went on`;
  switch (task.kind) {
    case 'analyze':
      return { kind: 'analyze', path: task.path, line: JSON.stringify({ path: task.path, error }), failed: true };
    case 'check':
      return { kind: 'check', path: task.path, outcome: { file: task.path, doc: null, result: null, error }, failed: true };
    case 'annotate':
      return { kind: 'annotate', path: task.path, out: [], err: [], error, failed: true };
  }
}

/**
 * Start the workers of an N-job pool (N − 1 threads: this thread is the N-th) before the runs are known, so
 * that their start (loading the code and the symmetry library) overlaps the search for runs.
 */
export function prestartWorkers(jobs: number): Worker[] {
  const out: Worker[] = [];
  for (let i = 1; i < Math.floor(jobs); i++) out.push(startWorker());
  return out;
}

/** Tasks sent to a worker ahead of time, so it never waits for the main thread between two tasks. */
const IN_FLIGHT_PER_WORKER = 2;

export async function runPool(
  tasks: readonly BatchTask[],
  jobs: number,
  onResult: (r: BatchResult, index: number) => void,
  onProgress?: (p: PoolProgress) => void,
  prestarted: Worker[] = [],
): Promise<void> {
  const total = tasks.length;
  let failed = 0;
  let done = 0;
  const results = new Array<BatchResult | undefined>(total);
  let nextOut = 0;
  const deliver = (i: number, r: BatchResult): void => {
    results[i] = r;
    done++;
    if (r.failed) failed++;
    while (nextOut < total && results[nextOut] !== undefined) {
      onResult(results[nextOut]!, nextOut);
      results[nextOut] = undefined;
      nextOut++;
    }
    onProgress?.({ done, failed, total });
  };
  // The main thread is one of the jobs: with N jobs, N − 1 workers start (each loads the code and the
  // symmetry library again, a fixed cost worth paying only once there is more than one job).
  const threads = Math.min(Math.max(1, Math.floor(jobs)), total);
  const ready = prestarted.slice(0, Math.max(0, threads - 1));
  for (const w of prestarted.slice(ready.length)) void w.terminate();
  let next = 0;
  // Tasks a lost worker had received but not started, to be given out again (lowest first).
  const retry: number[] = [];
  const hasWork = (): boolean => retry.length > 0 || next < total;
  const take = (): number => (retry.length > 0 ? retry.shift()! : next++);
  const allDone = new Promise<void>((resolve) => {
    const live = new Set<Worker>();
    const finishIfDone = (): void => {
      if (done < total) return;
      const all = [...live];
      live.clear();
      for (const w of all) void w.terminate();
      resolve();
    };
    const launch = (): void => {
      if (!hasWork()) {
        for (const w of ready.splice(0)) void w.terminate();
        return;
      }
      const w = ready.shift() ?? startWorker();
      live.add(w);
      const inFlight = new Set<number>();
      const feed = (): void => {
        while (inFlight.size < IN_FLIGHT_PER_WORKER && hasWork()) {
          const i = take();
          inFlight.add(i);
          w.postMessage({ id: i, task: tasks[i] });
        }
      };
      const lost = (why: string): void => {
        if (!live.delete(w)) return;
        void w.terminate();
        // A worker runs its tasks in the order received: the lowest one was running and fails with the
        // reason; the others had not started and go back in the queue.
        const held = [...inFlight].sort((a, b) => a - b);
        inFlight.clear();
        if (held.length > 0) {
          retry.push(...held.slice(1));
          retry.sort((a, b) => a - b);
          deliver(held[0]!, stoppedResult(tasks[held[0]!]!, why));
        }
        // A replacement takes the remaining tasks.
        launch();
        finishIfDone();
      };
      w.on('message', (m: { id: number; result: BatchResult }) => {
        if (!inFlight.delete(m.id)) return;
        deliver(m.id, m.result);
        feed();
        finishIfDone();
      });
      w.on('error', (e) => lost(e.message));
      w.on('exit', (code) => lost(`exit code ${code}`));
      feed();
    };
    for (let i = 1; i < threads; i++) launch();
    finishIfDone();
  });
  // This thread takes tasks too, one at a time, between which the workers' results are handled.
  while (hasWork()) {
    const i = take();
    deliver(i, await runTask(tasks[i]!));
    await new Promise<void>((r) => setImmediate(r));
  }
  if (done < total) await allDone;
}
