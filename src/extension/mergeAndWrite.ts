/**
 * The save loop for an annotations file that is not open in an editor: read it, merge, write atomically;
 * if someone changed it on disk in the meantime, read and merge again (their change is kept), a few times.
 * Pure over AtomicFs plus a reader, so faults can be tested.
 */
import { writeAtomically, type AtomicFs } from './atomicWrite';

export interface ReadState {
  text: string | null;
  mtime: number | null;
}

export type MergeOutcome<T> = { status: 'written'; result: T; attempts: number } | { status: 'kept-changing'; attempts: number };

/**
 * `read` gives the file's text and modification time (null, null: no file); `compose` turns the current text
 * into the text to write (it may throw, e.g. on a file it cannot read: nothing is written then).
 */
export async function mergeAndWrite<T extends { text: string }>(
  fs: AtomicFs,
  path: string,
  read: () => Promise<ReadState>,
  compose: (existing: string | null) => T,
  attempts = 3,
): Promise<MergeOutcome<T>> {
  for (let attempt = 1; attempt <= attempts; attempt++) {
    const cur = await read();
    const result = compose(cur.text);
    if ((await writeAtomically(fs, path, result.text, cur.mtime)) === 'written') return { status: 'written', result, attempts: attempt };
  }
  return { status: 'kept-changing', attempts };
}
