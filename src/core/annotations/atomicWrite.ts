/**
 * The one atomic-write contract for annotations files, shared by the CLI (node fs: src/cli/safeWrite.ts) and
 * the extension (workspace fs: src/extension/atomicWrite.ts), and the read → compose → write loop over it.
 *
 * "Unchanged since read" is decided by content, for both: the SHA-256 of the bytes read is compared with the
 * SHA-256 of the bytes on disk just before the rename. A modification time would miss a second write within
 * the file system's time resolution and would call a file changed that was only touched.
 */
import { sha256Hex } from '../hash';

/** What a file held when it was read: the SHA-256 (hex) of its bytes, or null when there was no file. */
export type ContentStamp = string | null;

export function contentStamp(bytes: Uint8Array | null): ContentStamp {
  return bytes === null ? null : sha256Hex(bytes);
}

export type AtomicWriteResult = 'written' | 'changed-on-disk';

/** Writes a whole file at once (a temporary file beside it, renamed over it), only over the content that was read. */
export interface AtomicWriter {
  /**
   * Replace `path` with `bytes` if the file still holds what was read (`expected`; null: it did not exist):
   * 'written'. If it changed meanwhile nothing is written: 'changed-on-disk'. A failure at any step leaves the
   * old file as it was and no temporary file behind; the error is passed on.
   */
  writeIfUnchanged(path: string, bytes: Uint8Array, expected: ContentStamp): Promise<AtomicWriteResult>;
}

/** A file as read before composing: its text (null: no file) and the stamp of its bytes. */
export interface ReadState {
  text: string | null;
  stamp: ContentStamp;
}

/** The read state of bytes just read (null: no file). */
export function readStateOf(bytes: Uint8Array | null): ReadState {
  return { text: bytes === null ? null : new TextDecoder('utf-8').decode(bytes), stamp: contentStamp(bytes) };
}

export type MergeOutcome<T> = { status: 'written'; result: T; attempts: number } | { status: 'kept-changing'; attempts: number };

/**
 * Read, compose, write atomically; if someone changed the file between the read and the write, read and compose
 * again (their change is kept), up to `attempts` times. `compose` turns the current text into the text to write;
 * when it throws (a file it cannot read), nothing is written.
 */
export async function mergeAndWrite<T extends { text: string }>(
  writer: AtomicWriter,
  path: string,
  read: () => Promise<ReadState>,
  compose: (existing: string | null) => T,
  attempts = 3,
): Promise<MergeOutcome<T>> {
  for (let attempt = 1; attempt <= attempts; attempt++) {
    const cur = await read();
    const result = compose(cur.text);
    const bytes = new TextEncoder().encode(result.text);
    if ((await writer.writeIfUnchanged(path, bytes, cur.stamp)) === 'written') return { status: 'written', result, attempts: attempt };
  }
  return { status: 'kept-changing', attempts };
}
