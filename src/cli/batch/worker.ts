/** Entry point of a batch worker thread (bundled as dist/batchWorker.js): runs the tasks the pool sends, one at a time. */
import { parentPort, workerData } from 'node:worker_threads';
import { ensureSymmetryReady } from '../../core/lattice/symmetry';
import { installNativeSha256 } from '../nativeHash';
import { runTask, type BatchTask } from './tasks';
import type { WorkerStart } from './pool';

export interface TaskMessage {
  id: number;
  task: BatchTask;
}

if (parentPort) {
  const port = parentPort;
  installNativeSha256();
  // Tasks arrive ahead of time; they run strictly one after another.
  const start = workerData as WorkerStart | null;
  let queue: Promise<unknown> = ensureSymmetryReady(start?.symmetryModule ?? undefined);
  port.on('message', (m: TaskMessage) => {
    queue = queue.then(() => runTask(m.task)).then((result) => port.postMessage({ id: m.id, result }));
  });
}
