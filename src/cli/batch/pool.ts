/**
 * A pool of worker threads for batch commands: each worker takes the next task when it finishes one; results
 * are handed on in the feed's order (path order, not the order of completion), so the output does not depend
 * on --jobs or on timing. Tasks may still be arriving (a search going on) while the first ones run. With one
 * job (or one task) the tasks run in this thread, one after another.
 */
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { symmetryCompiledModule } from '../../core/lattice/symmetry';
import { runTask, type BatchResult, type BatchTask } from './tasks';
import { TaskFeed } from './taskFeed';

/** What a worker is started with: this thread's compiled symmetry module, so the worker neither compiles it nor optimises its code again. */
export interface WorkerStart {
  symmetryModule: WebAssembly.Module | null;
}

export interface PoolProgress {
  done: number;
  failed: number;
  /** Tasks known so far: the total once `searching` is false. */
  total: number;
  searching: boolean;
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
  source: readonly BatchTask[] | TaskFeed,
  jobs: number,
  onResult: (r: BatchResult, index: number) => void,
  onProgress?: (p: PoolProgress) => void,
  prestarted: Worker[] = [],
): Promise<void> {
  const feed = source instanceof TaskFeed ? source : TaskFeed.of(source);
  const tasks = feed.tasks;
  let failed = 0;
  let done = 0;
  const results: (BatchResult | undefined)[] = [];
  let emitted = 0;
  // Results go out once the order is known (the feed closed), each as soon as all before it are in.
  const flush = (): void => {
    const order = feed.order;
    if (order === null) return;
    while (emitted < order.length && results[order[emitted]!] !== undefined) {
      const i = order[emitted]!;
      onResult(results[i]!, i);
      results[i] = undefined;
      emitted++;
    }
  };
  const deliver = (i: number, r: BatchResult): void => {
    results[i] = r;
    done++;
    if (r.failed) failed++;
    flush();
    onProgress?.({ done, failed, total: tasks.length, searching: !feed.closed });
  };
  // The main thread is one of the jobs: with N jobs, N − 1 workers (each loads the code and the symmetry
  // library again, a fixed cost worth paying only once there is more than one job).
  // Tasks known in full (a closed feed): no more workers than tasks beyond the one this thread takes.
  const extra = Math.max(0, Math.min(Math.floor(jobs) - 1, feed.closed ? tasks.length - 1 : Infinity));
  const ready = prestarted.slice(0, extra);
  for (const w of prestarted.slice(ready.length)) void w.terminate();
  let next = 0;
  // Tasks a lost worker had received but not started, to be given out again (lowest first).
  const retry: number[] = [];
  const hasWork = (): boolean => !feed.cancelled && (retry.length > 0 || next < tasks.length);
  const take = (): number => (retry.length > 0 ? retry.shift()! : next++);
  const finished = (): boolean => feed.cancelled || (feed.closed && done === tasks.length);
  const live = new Map<Worker, () => void>();
  // Set when a worker stops before it was given any task (it could not start): no more are started, and this
  // thread does the work.
  let noMoreWorkers = false;
  let resolveAll: () => void = () => undefined;
  const allDone = new Promise<void>((resolve) => (resolveAll = resolve));
  let wakeMain: (() => void) | null = null;
  const finishIfDone = (): void => {
    if (!finished()) return;
    for (const w of [...live.keys(), ...ready.splice(0)]) void w.terminate();
    live.clear();
    stopListening();
    resolveAll();
  };
  const launch = (): void => {
    const w = ready.shift() ?? startWorker();
    // Tasks given to this worker, in the order given: it runs them in that order, so the first is running.
    const given: number[] = [];
    const feedWorker = (): void => {
      while (given.length < IN_FLIGHT_PER_WORKER && hasWork()) {
        const i = take();
        given.push(i);
        w.postMessage({ id: i, task: tasks[i] });
      }
    };
    live.set(w, feedWorker);
    const lost = (why: string): void => {
      if (!live.delete(w)) return;
      void w.terminate();
      // The first task given was running and fails with the reason; the others had not started and go back
      // in the queue. A replacement takes the remaining tasks.
      const held = given.splice(0);
      if (held.length > 0) {
        retry.push(...held.slice(1));
        retry.sort((a, b) => a - b);
        deliver(held[0]!, stoppedResult(tasks[held[0]!]!, why));
      } else noMoreWorkers = true;
      startWorkers();
      wakeMain?.();
      finishIfDone();
    };
    w.on('message', (m: { id: number; result: BatchResult }) => {
      if (given[0] !== m.id) return;
      given.shift();
      deliver(m.id, m.result);
      feedWorker();
      finishIfDone();
    });
    w.on('error', (e) => lost(e.message));
    w.on('exit', (code) => lost(`exit code ${code}`));
    feedWorker();
  };
  const startWorkers = (): void => {
    while (!noMoreWorkers && live.size < extra && hasWork()) launch();
  };
  // New tasks go first to the workers (started as the first tasks arrive), then wake this thread.
  let toldClosed = false;
  const onChange = (): void => {
    for (const feedWorker of live.values()) feedWorker();
    startWorkers();
    flush();
    // The search has ended: the progress line gives the total (without "still searching").
    if (feed.closed && !toldClosed && !feed.cancelled && tasks.length > 0) {
      toldClosed = true;
      onProgress?.({ done, failed, total: tasks.length, searching: false });
    }
    wakeMain?.();
    finishIfDone();
  };
  const stopListening = feed.onChange(onChange);
  onChange();
  // This thread takes tasks too, one at a time, between which the workers' results are handled.
  for (;;) {
    if (hasWork()) {
      const i = take();
      deliver(i, await runTask(tasks[i]!));
      await new Promise<void>((r) => setImmediate(r));
      continue;
    }
    if (feed.closed) break;
    await new Promise<void>((r) => (wakeMain = r));
    wakeMain = null;
  }
  finishIfDone();
  await allDone;
}
