/** The batch side of analyze, check and annotate: find the runs, keep this shard's share, run them in the pool. */
import type { AnalysisSettings } from '../../core/analysis/analyze';
import type { ReadOptions } from '../../core/formats/types';
import type { Tolerances } from '../../core/annotations/compareAnnotations';
import type { CliIO } from '../io';
import type { FileOutcome, FoundAnnotations } from '../commands/check';
import type { EnergyZeroMode } from '../../core/report/energyZero';
import type { ReadFlags } from '../commands/annotate';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { findRuns, type FoundFile, type FoundRuns } from './findRuns';
import { inShard } from './shard';
import { prestartWorkers, runPool } from './pool';
import { progressReporter, type BatchOptions } from './batchOptions';
import type { BatchResult, BatchTask } from './tasks';
import { TaskFeed } from './taskFeed';
import { comparePaths } from './pathOrder';

function shardNote(opts: BatchOptions, kept: number, all: number, what: string): string | null {
  if (!opts.shard) return null;
  return `shard ${opts.shard.index}/${opts.shard.count}: ${kept} of the ${all} ${what}`;
}

/**
 * Search `roots` for runs and run this shard's share in the pool, each run started as soon as it is found (the
 * workers start meanwhile); results are handed to `onResult` in path order once the search has ended. Returns
 * the number of runs, or null (the workers stopped and a sentence on stderr) when there are none.
 */
async function searchAndRun(
  roots: string[],
  opts: BatchOptions,
  io: CliIO,
  command: string,
  what: string,
  taskOf: (path: string, file: FoundFile | undefined) => BatchTask,
  onResult: (r: BatchResult) => void,
): Promise<number | null> {
  const workers = prestartWorkers(opts.jobs);
  const feed = new TaskFeed();
  const paths: string[] = [];
  const progress = progressReporter(io.progress, what);
  const pool = runPool(feed, opts.jobs, onResult, progress.update, workers);
  let found: FoundRuns;
  try {
    found = await findRuns(nodeFileAccessor, roots, (path, file) => {
      if (!inShard(path, opts.shard)) return;
      paths.push(path);
      feed.push(taskOf(path, file));
    });
  } catch (e) {
    feed.cancel();
    await pool;
    throw e;
  }
  for (const n of found.notes) io.err(`valleyscope: ${n}`);
  if (found.runs.length === 0) {
    feed.close();
    await pool;
    io.err(`valleyscope ${command}: no eigenvalue files found under ${roots.join(', ')}`);
    return null;
  }
  const note = shardNote(opts, paths.length, found.runs.length, 'runs');
  if (note) io.err(`valleyscope: ${note}`);
  feed.close(
    paths
      .map((p, i) => [p, i] as const)
      .sort((a, b) => comparePaths(a[0], b[0]))
      .map(([, i]) => i),
  );
  await pool;
  progress.clear();
  return paths.length;
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
  let failed = 0;
  const runs = await searchAndRun(
    roots,
    opts,
    io,
    'analyze',
    'runs analysed',
    (path, file) =>
      file === undefined ? { kind: 'analyze', path, settings, read, zero } : { kind: 'analyze', path, settings, read, zero, found: file },
    (r) => {
      if (r.kind !== 'analyze') return;
      if (r.failed) failed++;
      io.out(r.line);
    },
  );
  if (runs === null) return 1;
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
  let failed = 0;
  const runs = await searchAndRun(
    roots,
    opts,
    io,
    'annotate',
    'runs annotated',
    (path) => ({ kind: 'annotate', path, settings, read }),
    (r) => {
      if (r.kind !== 'annotate') return;
      if (r.failed) failed++;
      if (opts.jsonl) {
        io.out(JSON.stringify({ path: r.path, messages: r.out, warnings: r.err, ...(r.error !== null ? { error: r.error } : {}) }));
        return;
      }
      io.progress?.('');
      for (const t of r.out) io.out(t);
      for (const t of r.err) io.err(t);
      if (r.error !== null) io.err(`valleyscope: ${r.error}`);
    },
  );
  if (runs === null) return 1;
  return failed > 0 ? 1 : 0;
}
