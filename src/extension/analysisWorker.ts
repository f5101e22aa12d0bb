/**
 * Worker-thread entry (desktop and remote extension hosts): reads and analyses one file off the extension
 * host's main thread, posting progress, so a large file does not freeze the editor. Cancellation is by
 * terminating the worker.
 */
import { parentPort } from 'node:worker_threads';
import { prepareAnalysis, runAnalysisJob, toJobError, transferablesOf, type AnalysisJob } from './analysisJob';
import type { WorkerReply } from './workerMessages';
import { installNativeSha256IfAvailable } from './nativeHashInWorker';

const port = parentPort;
if (port) {
  // Large files are hashed while they stream: the native hash is several times faster than the pure one.
  installNativeSha256IfAvailable();
  const prepared = prepareAnalysis();
  // One job per message; every failure (the preparation's too) is answered with a 'failed' reply.
  const handle = async (job: AnalysisJob): Promise<void> => {
    let last = -1;
    try {
      await prepared;
      const out = await runAnalysisJob(job, {
        onProgress: (f) => {
          // At most ~100 progress messages per job.
          const step = Math.floor(f * 100);
          if (step !== last) {
            last = step;
            port.postMessage({ type: 'progress', fraction: f } satisfies WorkerReply);
          }
        },
      });
      port.postMessage({ type: 'done', bs: out.bs, report: out.report } satisfies WorkerReply, transferablesOf(out.bs));
    } catch (e) {
      port.postMessage({ type: 'failed', error: toJobError(e) } satisfies WorkerReply);
    }
  };
  port.on('message', (job: AnalysisJob) => void handle(job));
}
