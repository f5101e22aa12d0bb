import assert from 'node:assert/strict';
import type { Worker } from 'node:worker_threads';
import { runAnalysisJob, toJobError, fromJobError, transferablesOf, type AnalysisJob } from '../../../src/extension/analysisJob';
import type { WorkerReply } from '../../../src/extension/workerMessages';
import { ReaderError, CancelledError, ValleyscopeError } from '../../../src/core/errors';
import { reportToJson } from '../../../src/core/report/reportJson';
import { analysisWorkerThread, folderJob, loadSi, SI_DIR } from './demoRun';

function siJob(): AnalysisJob {
  return folderJob(SI_DIR, 'EIGENVAL', ['POSCAR', 'KPOINTS']);
}

function runWorker(job: AnalysisJob, onProgress?: (f: number) => void): { done: Promise<WorkerReply>; worker: Worker } {
  const worker = analysisWorkerThread();
  const done = new Promise<WorkerReply>((resolve, reject) => {
    worker.on('message', (m: WorkerReply) => {
      if (m.type === 'progress') onProgress?.(m.fraction);
      else resolve(m);
    });
    worker.on('error', reject);
  });
  worker.postMessage(job);
  return { done, worker };
}

describe('extension: the analysis job (worker thread and in-process)', () => {
  it('gives the same report as the CLI path (loadRun + analyze) for the demo silicon run', async () => {
    const cli = await loadSi();
    const out = await runAnalysisJob(siJob());
    assert.deepEqual(reportToJson(out.report), reportToJson(cli.report));
    assert.deepEqual(out.bs.labels, cli.bs.labels);
  });

  it('runs on a worker thread, reports progress, and hands back typed arrays', async function () {
    this.timeout(60000);
    const fractions: number[] = [];
    const { done, worker } = runWorker(siJob(), (f) => fractions.push(f));
    try {
      const reply = await done;
      assert.equal(reply.type, 'done');
      if (reply.type !== 'done') return;
      const cli = await loadSi();
      assert.ok(reply.bs.energies[0] instanceof Float64Array);
      assert.deepEqual(Array.from(reply.bs.energies[0]), Array.from(cli.bs.energies[0]!));
      assert.deepEqual(reportToJson(reply.report), reportToJson(cli.report));
      assert.ok(fractions.length > 0, 'progress was reported');
      for (let i = 1; i < fractions.length; i++) assert.ok(fractions[i]! >= fractions[i - 1]!);
    } finally {
      await worker.terminate();
    }
  });

  it('sends a reader error back across the thread with its line and column', async function () {
    this.timeout(60000);
    const job = siJob();
    // Corrupt the energy of band 2 at the first k-point (line 10 of the file) into a non-number.
    const lines = new TextDecoder().decode(job.main.bytes).split('\n');
    lines[9] = lines[9]!.replace(/(\s+2\s+)\S+/, '$11*.45');
    assert.match(lines[9], /^\s+2\s+1\*\.45/);
    const text = lines.join('\n');
    job.main = { path: job.main.path, bytes: new TextEncoder().encode(text) };
    const { done, worker } = runWorker(job);
    try {
      const reply = await done;
      assert.equal(reply.type, 'failed');
      if (reply.type !== 'failed') return;
      const e = fromJobError(reply.error);
      assert.ok(e instanceof ReaderError);
      assert.equal(e.line, 10);
      assert.match(e.message, /EIGENVAL:\d+/);
    } finally {
      await worker.terminate();
    }
  });

  it('streams a local file from disk (no bytes handed over) with the same result, in-process and on a worker thread', async function () {
    this.timeout(60000);
    const cli = await loadSi();
    const job = siJob();
    const streamed: AnalysisJob = { ...job, main: { path: job.main.path, bytes: new Uint8Array(0) }, streamFrom: job.main.path };
    const out = await runAnalysisJob(streamed);
    assert.deepEqual(reportToJson(out.report), reportToJson(cli.report));
    assert.deepEqual(Array.from(out.bs.energies[0]!), Array.from(cli.bs.energies[0]!));
    // The content hash is of the file's bytes, streamed or not.
    assert.equal(out.bs.source.files[0]!.sha256, cli.bs.source.files[0]!.sha256);
    const { done, worker } = runWorker(streamed);
    try {
      const reply = await done;
      assert.equal(reply.type, 'done');
      if (reply.type === 'done') assert.deepEqual(reportToJson(reply.report), reportToJson(cli.report));
    } finally {
      await worker.terminate();
    }
  });

  it('keeps error kinds through the boundary', () => {
    const r = fromJobError(toJobError(new ReaderError('vasp-eigenval', 'f', { line: 3, column: 7 }, 'bad number')));
    assert.ok(r instanceof ReaderError);
    assert.equal(r.column, 7);
    assert.ok(fromJobError(toJobError(new CancelledError())) instanceof CancelledError);
    assert.ok(fromJobError(toJobError(new ValleyscopeError('x'))) instanceof ValleyscopeError);
    assert.match(fromJobError(toJobError(new TypeError('boom'))).message, /internal error: boom/);
  });

  it('stops at the first progress report when cancelled in-process', async () => {
    let cancelled = false;
    await assert.rejects(
      runAnalysisJob(siJob(), {
        isCancelled: () => cancelled,
        onProgress: () => {
          cancelled = true;
        },
      }),
      (e: unknown) => e instanceof CancelledError,
    );
  });

  it('lists each typed array buffer once for transfer', async () => {
    const out = await runAnalysisJob(siJob());
    const t = transferablesOf(out.bs);
    assert.equal(new Set(t).size, t.length);
    assert.ok(t.includes(out.bs.energies[0]!.buffer as ArrayBuffer));
  });
});
