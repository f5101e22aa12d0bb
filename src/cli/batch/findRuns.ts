/**
 * The runs named by a batch command line: a file is a run; a folder holding an eigenvalue file is a run;
 * any other folder is searched (sorted, up to MAX_DEPTH levels, version-control and package folders
 * skipped) for run folders. Paths are normalised (see shard.ts), returned in path order, without repeats.
 */
import type { FileAccessor } from '../../core/io/fileAccessor';
import { joinPath } from '../../core/io/fileAccessor';
import { locateRun } from '../../core/load';
import { ValleyscopeError } from '../../core/errors';
import { normalizeRunPath } from './shard';
import { comparePaths } from './pathOrder';

export const MAX_DEPTH = 32;
const SKIP_DIRS = new Set(['.git', '.hg', '.svn', 'node_modules']);

export interface FoundFile {
  file: string;
  readerId: string;
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
    return { file: loc.file, readerId: loc.reader.id };
  } catch (e) {
    if (e instanceof ValleyscopeError) return null;
    throw e;
  }
}

export async function findRuns(fs: FileAccessor, roots: readonly string[]): Promise<FoundRuns> {
  const found = new Set<string>();
  const files = new Map<string, FoundFile>();
  const notes: string[] = [];
  const walk = async (dir: string, depth: number): Promise<void> => {
    const file = await runFile(fs, dir);
    if (file !== null) {
      found.add(normalizeRunPath(dir));
      files.set(normalizeRunPath(dir), file);
      return;
    }
    if (depth >= MAX_DEPTH) {
      notes.push(`${dir}: not searched, ${MAX_DEPTH} folders deep`);
      return;
    }
    let entries;
    try {
      entries = await fs.list(dir);
    } catch {
      notes.push(`${dir}: the folder could not be listed`);
      return;
    }
    const dirs = entries
      .filter((e) => e.type === 'directory' && !SKIP_DIRS.has(e.name))
      .map((e) => e.name)
      .sort();
    for (const name of dirs) await walk(joinPath(dir, name), depth + 1);
  };
  for (const root of roots) {
    const st = await fs.stat(root);
    if (!st) throw new ValleyscopeError(`${root}: no such file or folder`);
    if (st.type === 'file') found.add(normalizeRunPath(root));
    else await walk(normalizeRunPath(root), 0);
  }
  return { runs: [...found].sort(comparePaths), files, notes };
}
