/** Entry point of a batch worker thread (bundled as dist/batchWorker.js): runs the tasks the pool sends, one at a time. */
import { parentPort } from 'node:worker_threads';
import { ensureSymmetryReady } from '../../core/lattice/symmetry';
import { installNativeSha256 } from '../nativeHash';
import { runTask, type BatchTask } from './tasks';

export interface TaskMessage {
  id: number;
  task: BatchTask;
}

if (parentPort) {
  const port = parentPort;
  installNativeSha256();
  // Tasks arrive ahead of time; they run strictly one after another.
  let queue: Promise<unknown> = ensureSymmetryReady();
  port.on('message', (m: TaskMessage) => {
    queue = queue.then(() => runTask(m.task)).then((result) => port.postMessage({ id: m.id, result }));
  });
}
