/**
 * The FileAccessor over node's file system, for the CLI. Keeps the contract of core/io/fileAccessor.ts:
 * only regular files are read (checked by type before opening, through links, and again on the open
 * descriptor), opened non-blocking so a FIFO swapped in at the last moment cannot hang the process, and
 * every whole-file read is bounded.
 */
import { closeSync, constants as fsc, fstatSync, openSync, readdirSync, readSync, realpathSync, statSync, type Stats } from 'node:fs';
import { join } from 'node:path';
import type { ByteRangeSource, DirEntry, EntryType, FileAccessor, FileStat } from '../core/io/fileAccessor';
import { READ_LIMITS, tooLargeSentence } from '../core/io/readLimits';
import { notRegularSentence } from '../core/io/pathPolicy';
import { entryKindOf } from '../core/io/entryKind';
import { ValleyscopeError } from '../core/errors';
import { fsErrorCode, fsErrorSentence } from './fsErrors';

/** O_NONBLOCK: opening a FIFO returns at once instead of waiting for a writer (0 where the platform lacks it). */
const OPEN_FLAGS = fsc.O_RDONLY | (fsc.O_NONBLOCK ?? 0) | (fsc.O_NOCTTY ?? 0);

function kindOf(s: Stats): { type: EntryType; kind?: string } {
  return entryKindOf(s);
}

function toFileStat(s: Stats): FileStat {
  return { ...kindOf(s), size: s.size };
}

function refuseIfNotRegular(path: string, s: Stats): void {
  const st = toFileStat(s);
  if (st.type !== 'file') throw new ValleyscopeError(notRegularSentence(path, st));
}

function statOrThrow(path: string): Stats {
  try {
    return statSync(path);
  } catch (e) {
    throw fsErrorSentence(path, e);
  }
}

/** The open descriptor must still be the regular file that was looked at (not swapped for a FIFO or device). */
function sameFile(a: Stats, b: Stats): boolean {
  return a.dev === b.dev && a.ino === b.ino && b.isFile();
}

/**
 * Synchronous on purpose: the CLI reads one run at a time per thread (the batch pool runs one per worker), and
 * a run's dozen small look-ups and reads each cost a hand-off to the I/O thread pool and back when
 * asynchronous: measured at about a tenth of a small run's time (CPU profile of 600 runs of 200 k-points).
 */
function readBounded(path: string, maxBytes: number, headOnly: boolean): Uint8Array {
  const before = statOrThrow(path);
  refuseIfNotRegular(path, before);
  if (!headOnly && before.size > maxBytes) throw new ValleyscopeError(tooLargeSentence(path, before.size, maxBytes));
  let fd: number;
  try {
    fd = openSync(path, OPEN_FLAGS);
  } catch (e) {
    throw fsErrorSentence(path, e);
  }
  try {
    const now = fstatSync(fd);
    if (!sameFile(before, now))
      throw new ValleyscopeError(`${path} changed into something other than the regular file it was while being opened; it was not read`);
    const want = Math.min(headOnly ? maxBytes : now.size, maxBytes);
    const buf = new Uint8Array(want);
    let got = 0;
    while (got < want) {
      const bytesRead = readSync(fd, buf, got, want - got, got);
      if (bytesRead === 0) break;
      got += bytesRead;
    }
    return got === want ? buf : buf.subarray(0, got);
  } catch (e) {
    throw fsErrorSentence(path, e);
  } finally {
    try {
      closeSync(fd);
    } catch {
      // closing a descriptor only read from cannot lose data
    }
  }
}

export const nodeFileAccessor: FileAccessor = {
  // async only by the interface's contract: the work is synchronous (see readBounded).
  async readFile(path: string, maxBytes: number = READ_LIMITS.data): Promise<Uint8Array> {
    return readBounded(path, maxBytes, false);
  },
  async readHead(path: string, bytes: number): Promise<Uint8Array> {
    return readBounded(path, bytes, true);
  },
  async stat(path: string): Promise<FileStat | null> {
    try {
      return toFileStat(statSync(path));
    } catch (e) {
      const code = fsErrorCode(e);
      if (code === 'ENOENT' || code === 'ENOTDIR') return null;
      throw fsErrorSentence(path, e, 'looked at');
    }
  },
  async realpath(path: string): Promise<string> {
    try {
      return realpathSync.native(path);
    } catch (e) {
      throw fsErrorSentence(path, e, 'looked at');
    }
  },
  openRanged(path: string): ByteRangeSource {
    let before: Stats;
    try {
      before = statSync(path);
    } catch (e) {
      throw fsErrorSentence(path, e);
    }
    refuseIfNotRegular(path, before);
    let fd: number;
    try {
      fd = openSync(path, OPEN_FLAGS);
    } catch (e) {
      throw fsErrorSentence(path, e);
    }
    const now = fstatSync(fd);
    if (!sameFile(before, now)) {
      closeSync(fd);
      throw new ValleyscopeError(`${path} changed into something other than the regular file it was while being opened; it was not read`);
    }
    const size = now.size;
    return {
      size,
      read(offset: number, length: number): Uint8Array {
        const n = Math.max(0, Math.min(length, size - offset));
        const buf = new Uint8Array(n);
        let got = 0;
        while (got < n) {
          const r = readSync(fd, buf, got, n - got, offset + got);
          if (r === 0) break;
          got += r;
        }
        return got === n ? buf : buf.subarray(0, got);
      },
      readInto(offset: number, target: Uint8Array, targetOffset: number, length: number): number {
        const n = Math.max(0, Math.min(length, size - offset, target.length - targetOffset));
        let got = 0;
        while (got < n) {
          const r = readSync(fd, target, targetOffset + got, n - got, offset + got);
          if (r === 0) break;
          got += r;
        }
        return got;
      },
      close(): void {
        closeSync(fd);
      },
    };
  },
  async list(dir: string): Promise<DirEntry[]> {
    let entries;
    try {
      entries = readdirSync(dir, { withFileTypes: true });
    } catch (e) {
      throw fsErrorSentence(dir, e, 'listed');
    }
    const out: DirEntry[] = [];
    for (const e of entries) {
      if (e.isSymbolicLink()) {
        // Followed for its type; whether its target may be opened is the path policy's decision.
        try {
          out.push({ name: e.name, type: kindOf(statSync(join(dir, e.name))).type, link: true });
        } catch {
          // A dangling link is nothing to read.
        }
      } else if (e.isFile()) out.push({ name: e.name, type: 'file' });
      else if (e.isDirectory()) out.push({ name: e.name, type: 'directory' });
      else out.push({ name: e.name, type: 'other' });
    }
    return out;
  },
};
