/** The options every batch command takes: --jsonl, --jobs N, --shard i/n. */
import { flag, numberFlag, type ParsedArgs } from '../args';
import { parseShard, type Shard } from './shard';
import { availableParallelism } from 'node:os';

/** --jobs when not given: the number of cores. */
export function defaultJobs(): number {
  return Math.max(1, availableParallelism());
}

export const BATCH_FLAGS = {
  jsonl: { value: false },
  jobs: { value: true },
  shard: { value: true },
} as const;

export const BATCH_HELP = `  --jsonl           one JSON object per line and per run (failures too, as a line with "error")
  --jobs <N>        work on N runs at once, in worker threads (default: the number of cores)
  --shard <i/n>     take only shard i of n (by a hash of each run's path; stable when runs are added), for
                    a scheduler's job array; merge the shards' --jsonl files with compare or check`;

export interface BatchOptions {
  jsonl: boolean;
  jobs: number;
  shard: Shard | null;
  /** True when any batch option was given. */
  requested: boolean;
}

export function batchOptionsFromArgs(p: ParsedArgs): BatchOptions {
  const jobs = numberFlag(p, 'jobs', (x) => Number.isInteger(x) && x >= 1 && x <= 1024, 'a whole number from 1 to 1024');
  const s = flag(p, 'shard');
  return {
    jsonl: p.flags.has('jsonl'),
    jobs: jobs ?? defaultJobs(),
    shard: s === undefined ? null : parseShard(s),
    requested: p.flags.has('jsonl') || p.flags.has('jobs') || p.flags.has('shard'),
  };
}

/** A transient "n of N" line on a terminal's stderr while a batch runs. */
export function progressReporter(
  progress: ((text: string) => void) | undefined,
  what: string,
): { update: (p: { done: number; failed: number; total: number; searching?: boolean }) => void; clear: () => void } {
  let last = 0;
  return {
    update: (p) => {
      if (!progress) return;
      const now = Date.now();
      if ((p.searching || p.done < p.total) && now - last < 100) return;
      last = now;
      const failed = p.failed ? `, ${p.failed} failed` : '';
      progress(`valleyscope: ${p.done}/${p.total} ${what}${failed}${p.searching ? ' (still searching for runs)' : ''}`);
    },
    clear: () => progress?.(''),
  };
}
