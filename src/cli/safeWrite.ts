/**
 * Writing a file so that a crash, a full disk or a concurrent change never leaves it truncated or loses
 * what someone else wrote in the meantime:
 *   1. write the new bytes to a temporary file beside the target (same folder, so the rename stays on one
 *      file system), flush them to disk (fsync);
 *   2. if asked, confirm the target still holds the bytes we read before (else stop: someone changed it);
 *   3. rename the temporary file over the target (atomic on POSIX file systems), then flush the folder.
 * On any failure the temporary file is removed and the target is left as it was.
 *
 * For annotations the target is always `<data file>.valleys.json` beside the data file
 * (writeAnnotationsBeside); no path read from any file's content is ever used here.
 */
import { promises as fsp, constants as fsc } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { dirname, join } from 'node:path';
import { ValleyscopeError } from '../core/errors';
import { annotationsPathFor } from '../core/annotations/annotationsModel';
import { contentStamp, type AtomicWriter, type ContentStamp } from '../core/annotations/atomicWrite';

/** The file-system calls used, replaceable in tests to simulate faults (disk full, crash before rename). */
export interface SafeWriteFs {
  open(path: string, flags: number, mode: number): Promise<fsp.FileHandle>;
  rename(from: string, to: string): Promise<void>;
  unlink(path: string): Promise<void>;
  readFile(path: string): Promise<Uint8Array>;
  stat(path: string): Promise<{ mode: number } | null>;
}

export const nodeSafeWriteFs: SafeWriteFs = {
  open: (p, flags, mode) => fsp.open(p, flags, mode),
  rename: (a, b) => fsp.rename(a, b),
  unlink: (p) => fsp.unlink(p),
  readFile: async (p) => new Uint8Array(await fsp.readFile(p)),
  stat: async (p) => {
    try {
      return await fsp.stat(p);
    } catch {
      return null;
    }
  },
};

export interface SafeWriteOptions {
  /**
   * What the caller read from the target before computing the new content: `null` when it did not exist,
   * the bytes when it did. The write stops (WriteConflictError) if the target's content changed since (the
   * rule of core/annotations/atomicWrite.ts). Leave out to overwrite whatever is there.
   */
  expectExisting?: Uint8Array | null;
  /** The same, as the content stamp of what was read (takes precedence over expectExisting). */
  expectStamp?: ContentStamp;
  fs?: SafeWriteFs;
  /** Called after the temporary file is written and flushed, before the rename (tests simulate crashes here). */
  beforeRename?: (tempPath: string) => void | Promise<void>;
}

/** The target changed on disk between reading it and writing it; nothing was written. */
export class WriteConflictError extends ValleyscopeError {
  constructor(readonly target: string) {
    super(
      `${target} changed on disk while Valleyscope was updating it; nothing was written — run the command again to merge with the new content`,
    );
    this.name = 'WriteConflictError';
  }
}

function explain(target: string, e: unknown): ValleyscopeError {
  if (e instanceof ValleyscopeError) return e;
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  const what =
    code === 'ENOSPC'
      ? 'the disk is full'
      : code === 'EDQUOT'
        ? 'the disk quota is used up'
        : code === 'EACCES' || code === 'EPERM'
          ? 'permission to write in its folder is denied'
          : code === 'EROFS'
            ? 'the file system is read-only'
            : code === 'ENOENT'
              ? 'its folder does not exist'
              : code === 'ENAMETOOLONG'
                ? 'its name is too long for the file system'
                : `the system reported ${code ?? (e as Error)?.message ?? String(e)}`;
  return new ValleyscopeError(`${target} could not be written (${what}); the previous file, if any, is unchanged`);
}

/**
 * Temporary files are hidden, short (so a long target name cannot make them too long for the file system),
 * and unique per attempt: `.vs-<pid in base 36>-<8 hex digits>.tmp` beside the target.
 */
export function tempPathFor(target: string): string {
  return join(dirname(target), `.vs-${process.pid.toString(36)}-${randomBytes(4).toString('hex')}.tmp`);
}

/** Our temporary names: the current form, and the older `.<target>.<pid>.<hex>.tmp`. */
const TEMP_NAME = /^\.vs-([0-9a-z]{1,8})-[0-9a-f]{8}\.tmp$/;
const OLD_TEMP_NAME = /^\..+\.valleys\.json\.(\d{1,10})\.[0-9a-f]{8}\.tmp$/;

/** A temporary file younger than this may belong to a write in progress (on this or another machine). */
export const STALE_TEMP_AGE_MS = 60_000;
/** Older than this, a temporary file is stale whoever wrote it. */
const ABANDONED_TEMP_AGE_MS = 24 * 3600_000;

function processAlive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Remove the temporary files a killed write left in `dir`: ours by name, regular files (never a link), older
 * than a minute, and either of a process that is gone or older than a day. Best effort; returns the names
 * removed.
 */
export async function removeStaleTemps(dir: string, now = Date.now()): Promise<string[]> {
  const removed: string[] = [];
  let names: string[];
  try {
    names = await fsp.readdir(dir);
  } catch {
    return removed;
  }
  for (const name of names) {
    const m = TEMP_NAME.exec(name) ?? OLD_TEMP_NAME.exec(name);
    if (!m) continue;
    const pid = TEMP_NAME.test(name) ? parseInt(m[1]!, 36) : Number(m[1]);
    const p = join(dir, name);
    try {
      const st = await fsp.lstat(p);
      if (!st.isFile()) continue;
      const age = now - st.mtimeMs;
      if (age < STALE_TEMP_AGE_MS) continue;
      if (age < ABANDONED_TEMP_AGE_MS && processAlive(pid)) continue;
      await fsp.unlink(p);
      removed.push(name);
    } catch {
      // Gone already, or not ours to remove.
    }
  }
  return removed;
}

export async function writeFileSafely(target: string, content: Uint8Array | string, options: SafeWriteOptions = {}): Promise<void> {
  const fs = options.fs ?? nodeSafeWriteFs;
  const bytes = typeof content === 'string' ? new TextEncoder().encode(content) : content;
  const temp = tempPathFor(target);
  if (!options.fs) await removeStaleTemps(dirname(target));
  const existing = await fs.stat(target);
  const mode = existing ? existing.mode & 0o777 : 0o644;
  let handle: fsp.FileHandle | null = null;
  let renamed = false;
  try {
    handle = await fs.open(temp, fsc.O_WRONLY | fsc.O_CREAT | fsc.O_EXCL, mode);
    let off = 0;
    while (off < bytes.length) {
      const { bytesWritten } = await handle.write(bytes, off, bytes.length - off, off);
      if (bytesWritten <= 0) throw Object.assign(new Error('no progress writing'), { code: 'EIO' });
      off += bytesWritten;
    }
    await handle.sync();
    await handle.close();
    handle = null;
    if (options.beforeRename) await options.beforeRename(temp);
    const expected =
      options.expectStamp !== undefined
        ? options.expectStamp
        : options.expectExisting !== undefined
          ? contentStamp(options.expectExisting)
          : undefined;
    if (expected !== undefined) {
      let now: Uint8Array | null;
      try {
        now = await fs.readFile(target);
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
        now = null;
      }
      if (contentStamp(now) !== expected) throw new WriteConflictError(target);
    }
    await fs.rename(temp, target);
    renamed = true;
    await syncFolder(dirname(target));
  } catch (e) {
    if (handle) await handle.close().catch(() => undefined);
    if (!renamed) await fs.unlink(temp).catch(() => undefined);
    throw explain(target, e);
  }
}

/** Flush the folder entry of the rename; best effort (not every platform allows opening a folder). */
async function syncFolder(dir: string): Promise<void> {
  let h: fsp.FileHandle | null = null;
  try {
    h = await fsp.open(dir, 'r');
    await h.sync();
  } catch {
    // Windows and some network file systems refuse; the rename itself is still atomic.
  } finally {
    await h?.close().catch(() => undefined);
  }
}

/** Write the annotations of `dataFile`: always to `<dataFile>.valleys.json` beside it. Returns that path. */
export async function writeAnnotationsBeside(dataFile: string, text: string, options: SafeWriteOptions = {}): Promise<string> {
  const target = annotationsPathFor(dataFile);
  await writeFileSafely(target, text, options);
  return target;
}

/** The CLI's side of the atomic-write contract (core/annotations/atomicWrite.ts), over node's fs. */
export function nodeAtomicWriter(options: Pick<SafeWriteOptions, 'fs' | 'beforeRename'> = {}): AtomicWriter {
  return {
    async writeIfUnchanged(path, bytes, expected) {
      try {
        await writeFileSafely(path, bytes, { ...options, expectStamp: expected });
        return 'written';
      } catch (e) {
        if (e instanceof WriteConflictError) return 'changed-on-disk';
        throw e;
      }
    },
  };
}
