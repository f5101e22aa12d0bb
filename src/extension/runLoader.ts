/**
 * Load and analyse a run through the workspace file system. Reading and analysis run on a worker thread on
 * desktop and remote hosts (the editor stays responsive on files of hundreds of MB), in-process on the web.
 * Progress is reported and cancellation honoured; the bytes are handed to the worker without a copy.
 */
import type * as vscode from 'vscode';
import { Worker } from 'node:worker_threads';
import { STREAM_ABOVE_BYTES, locateRun, otherCandidatesNotice, readCompanions } from '../core/load';
import { canReadLocalRanges } from './localRangedSource';
import { pathGeometry, type PathGeometry } from '../core/lattice/kpath';
import type { BandStructure, Report } from '../core/model';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { CancelledError } from '../core/errors';
import { WorkspaceFileAccessor } from './fileAccessor';
import { analyzeRead, fromJobError, prepareAnalysis, readJobInput, type AnalysisJob, type AnalysisOutcome } from './analysisJob';
import type { WorkerReply, WorkerRequest } from './workerMessages';
import { isMeshRun, MAX_WORKER_VIEW_POINTS } from './meshRunView';
import type { MeshPointsWithEnergies } from '../core/interpolation/meshPointsOnPath';

export interface LoadedRun {
  /** The URI the user opened (a file or a run folder). */
  uri: vscode.Uri;
  /** The eigenvalue file that was read (differs from uri when a folder was opened). */
  fileUri: vscode.Uri;
  bs: BandStructure;
  report: Report;
  geometry: PathGeometry;
  /** Size of the eigenvalue file in bytes when read (used to notice growth). */
  size: number;
  /** A mesh run shown as interpolated bands: its mesh points on the path, with their energies (data). */
  meshPoints?: MeshPointsWithEnergies;
}

export interface LoadOptions {
  settings: AnalysisSettings;
  maxBytes: number;
  /** The built worker script (dist/analysisWorker.js) as a file path, or null to stay in-process. */
  workerScript: string | null;
  /** Files at least this large go to the worker. */
  workerThresholdBytes: number;
}

export type ProgressSink = (fraction: number, message: string) => void;

export async function loadAndAnalyze(
  uri: vscode.Uri,
  opts: LoadOptions,
  token: vscode.CancellationToken,
  progress: ProgressSink,
): Promise<LoadedRun> {
  const fs = new WorkspaceFileAccessor(uri, opts.maxBytes);
  try {
    progress(0, 'finding the eigenvalue file');
    // Symmetry is needed on this thread too: fits at clicked points run here.
    const symmetryProblem = await prepareAnalysis();
    if (symmetryProblem) progress(0, symmetryProblem);
    const loc = await locateRun(fs, uri.path);
    if (token.isCancellationRequested) throw new CancelledError();
    progress(0, 'reading');
    const fileUri = fs.uri(loc.file);
    const workerAvailable = Worker !== undefined && opts.workerScript !== null;
    // A very large local file, with a reader that can stream: the worker streams it from disk (the bytes are
    // never held whole, here or there). Otherwise the bytes are read here and handed over.
    const st = await fs.stat(loc.file);
    const stream =
      workerAvailable &&
      loc.reader.streaming === true &&
      fileUri.scheme === 'file' &&
      canReadLocalRanges() &&
      st !== null &&
      st.size > STREAM_ABOVE_BYTES;
    if (stream) await fs.checkSize(fileUri, loc.file);
    const bytes = stream ? new Uint8Array(0) : await fs.readFile(loc.file);
    const companions = await readCompanions(fs, loc);
    fs.release();
    if (token.isCancellationRequested) throw new CancelledError();
    const size = stream ? st.size : bytes.byteLength;
    const useWorker = workerAvailable && size >= opts.workerThresholdBytes;
    // A mesh run is shown as its interpolated bands along the standard path (meshRunView.ts): made by the job
    // where it runs on the worker or where there is no worker; a small mesh run read here is analysed and made
    // into that picture on the worker (both interpolate: seconds on large meshes). Path runs as before.
    const job: AnalysisJob = {
      readerId: loc.reader.id,
      main: { path: loc.file, bytes },
      companions,
      read: { allowPartial: true },
      settings: opts.settings,
      forView: useWorker || !workerAvailable,
    };
    if (stream) job.streamFrom = fileUri.fsPath;
    if (useWorker) job.viewPoints = MAX_WORKER_VIEW_POINTS;
    const out = useWorker ? await runInWorker(opts.workerScript!, job, token, progress) : await runInProcess(job, opts, token, progress);
    const notice = otherCandidatesNotice(loc);
    if (notice) out.report.warnings.push(notice);
    progress(1, 'path geometry');
    const loaded: LoadedRun = { uri, fileUri, bs: out.bs, report: out.report, geometry: pathGeometry(out.bs), size };
    if (out.meshPoints) loaded.meshPoints = out.meshPoints;
    return loaded;
  } finally {
    fs.release();
  }
}

async function runInProcess(
  job: AnalysisJob,
  opts: LoadOptions,
  token: vscode.CancellationToken,
  progress: ProgressSink,
): Promise<AnalysisOutcome> {
  const bs = await readJobInput(job, {
    isCancelled: () => token.isCancellationRequested,
    onProgress: (f) => progress(f, 'reading'),
  });
  if (job.forView || !isMeshRun(bs)) return analyzeRead(bs, job);
  return meshViewInWorker(opts.workerScript!, bs, opts.settings, token, progress);
}

function runInWorker(script: string, job: AnalysisJob, token: vscode.CancellationToken, progress: ProgressSink): Promise<AnalysisOutcome> {
  const b = job.main.bytes;
  const whole = b.byteOffset === 0 && b.byteLength === b.buffer.byteLength && b.buffer instanceof ArrayBuffer;
  return inWorker(script, job, whole ? [b.buffer] : [], token, progress);
}

/**
 * A small mesh run read here, analysed and shown as its interpolated bands by a worker (the interpolation takes
 * seconds on large meshes). The run is copied over; should the worker fail, it is analysed here and shown as its
 * points, with the reason.
 */
async function meshViewInWorker(
  script: string,
  bs: BandStructure,
  settings: AnalysisJob['settings'],
  token: vscode.CancellationToken,
  progress: ProgressSink,
): Promise<AnalysisOutcome> {
  progress(0, 'interpolating the mesh');
  try {
    return await inWorker(script, { kind: 'meshView', run: { bs }, settings }, [], token, progress);
  } catch (e) {
    if (e instanceof CancelledError) throw e;
    const run = analyzeRead(bs, { settings });
    run.report.warnings.push(`The interpolated bands could not be drawn along a path: ${e instanceof Error ? e.message : String(e)}`);
    return run;
  }
}

function inWorker(
  script: string,
  request: WorkerRequest,
  transfer: ArrayBuffer[],
  token: vscode.CancellationToken,
  progress: ProgressSink,
): Promise<AnalysisOutcome> {
  return new Promise<AnalysisOutcome>((resolve, reject) => {
    const worker = new Worker(script);
    let settled = false;
    const finish = (f: () => void): void => {
      if (settled) return;
      settled = true;
      sub.dispose();
      void worker.terminate();
      f();
    };
    const sub = token.onCancellationRequested(() => finish(() => reject(new CancelledError())));
    worker.on('message', (m: WorkerReply) => {
      if (m.type === 'progress') progress(m.fraction, 'reading');
      else if (m.type === 'done')
        finish(() => resolve({ bs: m.bs, report: m.report, ...(m.meshPoints ? { meshPoints: m.meshPoints } : {}) }));
      else finish(() => reject(fromJobError(m.error)));
    });
    worker.on('error', (e) => finish(() => reject(new Error(`analysis worker failed: ${e.message}`))));
    worker.on('exit', (code) => finish(() => reject(new Error(`analysis worker stopped (exit code ${code})`))));
    worker.postMessage(request, transfer);
  });
}
