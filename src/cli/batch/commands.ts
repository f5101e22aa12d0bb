/** The batch side of analyze, check and annotate: find the runs, keep this shard's share, run them in the pool. */
import type { AnalysisSettings } from '../../core/analysis/analyze';
import type { ReadOptions } from '../../core/formats/types';
import type { Tolerances } from '../../core/annotations/compareAnnotations';
import type { CliIO } from '../io';
import type { FileOutcome, FoundAnnotations } from '../commands/check';
import type { EnergyZeroMode } from '../../core/report/energyZero';
import type { ReadFlags } from '../commands/annotate';
import { nodeFileAccessor } from '../nodeFileAccessor';
import type { Worker } from 'node:worker_threads';
import { findRuns, type FoundRuns } from './findRuns';
import { inShard } from './shard';
import { prestartWorkers, runPool } from './pool';
import { progressReporter, type BatchOptions } from './batchOptions';
import type { BatchTask } from './tasks';

function shardNote(opts: BatchOptions, kept: number, all: number, what: string): string | null {
  if (!opts.shard) return null;
  return `shard ${opts.shard.index}/${opts.shard.count}: ${kept} of the ${all} ${what}`;
}

/**
 * The runs under `roots`, with the pool's workers started meanwhile (their start overlaps the search). Null,
 * the workers stopped and a sentence on stderr, when there are none.
 */
async function runsWithWorkers(
  roots: string[],
  opts: BatchOptions,
  io: CliIO,
  command: string,
): Promise<{ found: FoundRuns; workers: Worker[] } | null> {
  const workers = prestartWorkers(opts.jobs);
  const stop = (): void => {
    for (const w of workers) void w.terminate();
  };
  let found: FoundRuns;
  try {
    found = await findRuns(nodeFileAccessor, roots);
  } catch (e) {
    stop();
    throw e;
  }
  for (const n of found.notes) io.err(`valleyscope: ${n}`);
  if (found.runs.length === 0) {
    stop();
    io.err(`valleyscope ${command}: no eigenvalue files found under ${roots.join(', ')}`);
    return null;
  }
  return { found, workers };
}

/** `analyze --jsonl`: one line per run, in path order; exit 1 when any run failed (its line says why). */
export async function analyzeBatch(
  roots: string[],
  settings: Partial<AnalysisSettings>,
  read: ReadOptions,
  opts: BatchOptions,
  io: CliIO,
  zero: EnergyZeroMode = 'vbm',
): Promise<number> {
  const search = await runsWithWorkers(roots, opts, io, 'analyze');
  if (!search) return 1;
  const { found, workers } = search;
  const runs = found.runs.filter((r) => inShard(r, opts.shard));
  const note = shardNote(opts, runs.length, found.runs.length, 'runs');
  if (note) io.err(`valleyscope: ${note}`);
  const tasks: BatchTask[] = runs.map((path) => {
    const file = found.files.get(path);
    return file === undefined
      ? { kind: 'analyze', path, settings, read, zero }
      : { kind: 'analyze', path, settings, read, zero, found: file };
  });
  let failed = 0;
  const progress = progressReporter(io.progress, 'runs analysed');
  await runPool(
    tasks,
    opts.jobs,
    (r) => {
      if (r.kind !== 'analyze') return;
      if (r.failed) failed++;
      io.out(r.line);
    },
    progress.update,
    workers,
  );
  progress.clear();
  return failed > 0 ? 1 : 0;
}

/** Check annotations files in the pool; outcomes in the order of `files`. */
export async function checkInPool(
  files: FoundAnnotations[],
  tolerances: Tolerances,
  opts: BatchOptions,
  io: CliIO,
): Promise<FileOutcome[]> {
  const outcomes: FileOutcome[] = [];
  const progress = progressReporter(io.progress, 'annotations files checked');
  await runPool(
    files.map((f): BatchTask => ({ kind: 'check', path: f.file, tolerances, root: f.root })),
    opts.jobs,
    (r) => {
      if (r.kind === 'check') outcomes.push(r.outcome);
    },
    progress.update,
  );
  progress.clear();
  return outcomes;
}

/** `annotate` with batch options: every run found under the paths, this shard's share, in the pool. */
export async function annotateBatch(
  roots: string[],
  settings: Partial<AnalysisSettings>,
  read: ReadFlags,
  opts: BatchOptions,
  io: CliIO,
): Promise<number> {
  const search = await runsWithWorkers(roots, opts, io, 'annotate');
  if (!search) return 1;
  const { found, workers } = search;
  const runs = found.runs.filter((r) => inShard(r, opts.shard));
  let failed = 0;
  const progress = progressReporter(io.progress, 'runs annotated');
  await runPool(
    runs.map((path): BatchTask => ({ kind: 'annotate', path, settings, read })),
    opts.jobs,
    (r) => {
      if (r.kind !== 'annotate') return;
      if (r.failed) failed++;
      if (opts.jsonl) {
        io.out(JSON.stringify({ path: r.path, messages: r.out, warnings: r.err, ...(r.error !== null ? { error: r.error } : {}) }));
        return;
      }
      progress.clear();
      for (const t of r.out) io.out(t);
      for (const t of r.err) io.err(t);
      if (r.error !== null) io.err(`valleyscope: ${r.error}`);
    },
    progress.update,
    workers,
  );
  progress.clear();
  return failed > 0 ? 1 : 0;
}
