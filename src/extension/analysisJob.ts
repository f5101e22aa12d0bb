/**
 * One load-and-analyse job, as run by the worker thread (desktop) or in-process (web): bytes in, band
 * structure and report out. Pure: no `vscode`, no file system; the host reads the bytes first.
 */
import type { BandStructure, Report } from '../core/model';
import type { InputFile } from '../core/io/fileAccessor';
import type { ReadOptions } from '../core/formats/types';
import { readerById } from '../core/formats/index';
import { readFromBytes } from '../core/load';
import { openLocalRanged } from './localRangedSource';
import { analyzeBandStructure, type AnalysisSettings } from '../core/analysis/analyze';
import { ReaderError, ValleyscopeError, CancelledError } from '../core/errors';
import { ensureSymmetryReady } from '../core/lattice/symmetry';
import { MAX_WORKER_VIEW_POINTS, meshRunForView, type ViewRun } from './meshRunView';

/**
 * Load what analysis needs before the first job in a thread: the crystal-symmetry module (its WebAssembly is
 * compiled asynchronously). Resolves with null, or the sentence saying why symmetry is unavailable.
 */
export async function prepareAnalysis(): Promise<string | null> {
  try {
    await ensureSymmetryReady();
    return null;
  } catch (e) {
    return `crystal symmetry unavailable: ${e instanceof Error ? e.message : String(e)}`;
  }
}

export interface AnalysisJob {
  readerId: string;
  /** The main file's bytes; empty when `streamFrom` is given. */
  main: InputFile;
  /** Local path of the main file to stream from (very large files, readers that can stream, node only). */
  streamFrom?: string;
  companions: InputFile[];
  read: Pick<ReadOptions, 'spinorbit' | 'alatAngstrom' | 'allowPartial'>;
  settings: AnalysisSettings;
  /** Also make what the band view shows (a mesh run's interpolated bands along the path: meshRunView.ts). */
  forView?: boolean;
  /** With `forView`: most irreducible points drawn interpolated (meshRunView.ts; default MAX_PATH_VIEW_POINTS). */
  viewPoints?: number;
}

/**
 * A mesh run read on the host, analysed (when `report` is absent) and made into the band view's picture on the
 * worker (meshRunView.ts): both interpolate, which takes seconds on large meshes.
 */
export interface MeshViewJob {
  kind: 'meshView';
  run: { bs: BandStructure; report?: Report };
  settings: AnalysisSettings;
}

/** The analysis and band-view picture of a mesh view job. */
export function runMeshViewJob(job: MeshViewJob): AnalysisOutcome {
  const report = job.run.report ?? analyzeBandStructure(job.run.bs, job.settings);
  return meshRunForView({ bs: job.run.bs, report }, job.settings, MAX_WORKER_VIEW_POINTS);
}

/** The run as read and analysed; with `forView`, as the band view shows it (a mesh run's points on the path). */
export type AnalysisOutcome = ViewRun;

/** An error as it crosses a thread boundary (class identity is lost in structured clone). */
export interface JobError {
  kind: 'reader' | 'valleyscope' | 'cancelled' | 'internal';
  message: string;
  file?: string;
  line?: number;
  column?: number;
  format?: string;
  reason?: string;
}

export interface JobHooks {
  isCancelled?: () => boolean;
  onProgress?: (fraction: number) => void;
}

export async function runAnalysisJob(job: AnalysisJob, hooks: JobHooks = {}): Promise<AnalysisOutcome> {
  return analyzeRead(await readJobInput(job, hooks), job);
}

/** The analysis of a run read by `readJobInput` (with `forView`, the band view's picture of a mesh run). */
export function analyzeRead(bs: BandStructure, job: Pick<AnalysisJob, 'settings' | 'forView' | 'viewPoints'>): AnalysisOutcome {
  const report = analyzeBandStructure(bs, job.settings);
  return job.forView ? meshRunForView({ bs, report }, job.settings, job.viewPoints) : { bs, report };
}

/** The run of a job, read (streamed from disk when `streamFrom` is given), not yet analysed. */
export async function readJobInput(job: AnalysisJob, hooks: JobHooks = {}): Promise<BandStructure> {
  const reader = readerById(job.readerId);
  if (!reader) throw new ValleyscopeError(`${job.main.path}: no reader named ${job.readerId}`);
  const options: ReadOptions = { ...job.read };
  if (hooks.isCancelled) options.isCancelled = hooks.isCancelled;
  if (hooks.onProgress) options.onProgress = hooks.onProgress;
  let bs: BandStructure;
  if (job.streamFrom !== undefined) {
    // Very large local file: the reader streams it in windows; memory holds the arrays, not the text.
    const stream = openLocalRanged(job.streamFrom);
    try {
      bs = await readFromBytes(reader, { path: job.main.path, bytes: new Uint8Array(0), stream }, job.companions, options);
    } finally {
      stream.close();
    }
  } else bs = await readFromBytes(reader, job.main, job.companions, options);
  if (hooks.isCancelled?.()) throw new CancelledError();
  return bs;
}

export function toJobError(e: unknown): JobError {
  if (e instanceof ReaderError) {
    return { kind: 'reader', message: e.message, file: e.file, line: e.line, column: e.column, format: e.format, reason: e.reason };
  }
  if (e instanceof CancelledError) return { kind: 'cancelled', message: e.message };
  if (e instanceof ValleyscopeError) return { kind: 'valleyscope', message: e.message };
  return { kind: 'internal', message: e instanceof Error ? `internal error: ${e.message}` : `internal error: ${String(e)}` };
}

export function fromJobError(j: JobError): Error {
  switch (j.kind) {
    case 'reader':
      return new ReaderError(j.format ?? '', j.file ?? '', { line: j.line ?? 0, column: j.column ?? 0 }, j.reason ?? j.message);
    case 'cancelled':
      return new CancelledError();
    case 'valleyscope':
      return new ValleyscopeError(j.message);
    default:
      return new Error(j.message);
  }
}

/** The typed arrays of a band structure, to hand over to another thread without copying. */
export function transferablesOf(bs: BandStructure): ArrayBuffer[] {
  const set = new Set<ArrayBuffer>();
  const add = (a: Float64Array | Float32Array | null | undefined): void => {
    if (a && a.buffer instanceof ArrayBuffer) set.add(a.buffer);
  };
  add(bs.kpoints);
  add(bs.weights);
  add(bs.writtenDistance);
  bs.energies.forEach(add);
  bs.occupations?.forEach(add);
  if (bs.structure) add(bs.structure.positions);
  return [...set];
}

/** The typed arrays of a view outcome (the band structure's and the mesh points'), for transfer. */
export function outcomeTransferables(out: AnalysisOutcome): ArrayBuffer[] {
  const list = transferablesOf(out.bs);
  const m = out.meshPoints;
  if (m) {
    for (const a of [m.distance, m.kpoints, m.irreducible, ...m.energies]) {
      if (a.buffer instanceof ArrayBuffer && !list.includes(a.buffer)) list.push(a.buffer);
    }
  }
  return list;
}
