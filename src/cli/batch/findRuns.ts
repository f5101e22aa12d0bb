/**
 * The runs named by a batch command line: a file is a run; a folder holding an eigenvalue file is a run;
 * any other folder is searched (sorted, up to MAX_DEPTH levels, version-control and package folders
 * skipped) for run folders. Paths are normalised (see shard.ts), returned in path order, without repeats.
 */
import type { FileAccessor } from '../../core/io/fileAccessor';
import { joinPath } from '../../core/io/fileAccessor';
import { locateRun, type OtherCandidate } from '../../core/load';
import { ValleyscopeError } from '../../core/errors';
import { normalizeRunPath } from './shard';
import { comparePaths } from './pathOrder';

export const MAX_DEPTH = 32;
const SKIP_DIRS = new Set(['.git', '.hg', '.svn', 'node_modules']);

export interface FoundFile {
  file: string;
  readerId: string;
  /** The folder's other eigenvalue files (named in the run's notice, as `analyze <folder>` names them). */
  others?: OtherCandidate[];
}

export interface FoundRuns {
  runs: string[];
  /**
   * The eigenvalue file found in each run folder and the id of the reader that recognised it (run path → both),
   * so it need not be searched for or recognised again.
   */
  files: Map<string, FoundFile>;
  /** Sentences about what the search left out (depth limit reached). */
  notes: string[];
}

/** The eigenvalue file of a run folder and its reader, or null when the folder holds none. */
async function runFile(fs: FileAccessor, dir: string): Promise<FoundFile | null> {
  try {
    const loc = await locateRun(fs, dir);
    return { file: loc.file, readerId: loc.reader.id, others: loc.others ?? [] };
  } catch (e) {
    if (e instanceof ValleyscopeError) return null;
    throw e;
  }
}

/**
 * Folders looked at at once: on a cluster's network file system each look (list, stat, read a file's head) waits
 * for the server, so the search keeps several in flight; the result does not depend on the order they finish.
 */
export const SEARCH_CONCURRENCY = 16;

/** A gate letting at most `n` calls run at once. */
function limiter(n: number): <T>(f: () => Promise<T>) => Promise<T> {
  let active = 0;
  const waiting: (() => void)[] = [];
  return async (f) => {
    if (active >= n) await new Promise<void>((r) => waiting.push(r));
    active++;
    try {
      return await f();
    } finally {
      active--;
      waiting.shift()?.();
    }
  };
}

/**
 * `onRun`, when given, hears of each run as soon as it is found (in no particular order, each once), so work on it
 * can start while the search goes on. A named path that does not exist fails the search before any run is found.
 */
export async function findRuns(
  fs: FileAccessor,
  roots: readonly string[],
  onRun?: (run: string, file: FoundFile | undefined) => void,
): Promise<FoundRuns> {
  const found = new Set<string>();
  const files = new Map<string, FoundFile>();
  const notes: string[] = [];
  const gate = limiter(SEARCH_CONCURRENCY);
  const add = (run: string, file?: FoundFile): void => {
    if (found.has(run)) return;
    found.add(run);
    if (file) files.set(run, file);
    onRun?.(run, file);
  };
  const walk = async (dir: string, depth: number): Promise<void> => {
    const file = await gate(() => runFile(fs, dir));
    if (file !== null) {
      add(normalizeRunPath(dir), file);
      return;
    }
    if (depth >= MAX_DEPTH) {
      notes.push(`${dir}: not searched, ${MAX_DEPTH} folders deep`);
      return;
    }
    let entries;
    try {
      entries = await gate(() => fs.list(dir));
    } catch {
      notes.push(`${dir}: the folder could not be listed`);
      return;
    }
    const dirs = entries
      .filter((e) => e.type === 'directory' && !SKIP_DIRS.has(e.name))
      .map((e) => e.name)
      .sort();
    await Promise.all(dirs.map((name) => walk(joinPath(dir, name), depth + 1)));
  };
  const kinds = [];
  for (const root of roots) {
    const st = await fs.stat(root);
    if (!st) throw new ValleyscopeError(`${root}: no such file or folder`);
    kinds.push(st.type);
  }
  for (let i = 0; i < roots.length; i++) {
    if (kinds[i] === 'file') add(normalizeRunPath(roots[i]!));
    else await walk(normalizeRunPath(roots[i]!), 0);
  }
  // Folders are searched several at a time: the notes in path order, like the runs.
  notes.sort(comparePaths);
  return { runs: [...found].sort(comparePaths), files, notes };
}
