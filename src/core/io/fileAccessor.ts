/**
 * How the core sees files, without importing any file system: the CLI passes a node implementation, the
 * extension one over `vscode.workspace.fs` (local, remote and virtual workspaces alike).
 * Paths are strings with '/' separators, interpreted only by the accessor.
 */

/**
 * What a path is, after following symbolic links. 'other' is anything that is neither a regular file nor a
 * folder (a FIFO, a socket, a character or block device): never read (see SECURITY.md).
 */
export type EntryType = 'file' | 'directory' | 'other';

export interface DirEntry {
  name: string;
  type: EntryType;
  /** The entry is a symbolic link (its type is that of what it points to). */
  link?: boolean;
}

export interface FileStat {
  type: EntryType;
  size: number;
  /** For type 'other': what it is, in words ("a FIFO (named pipe)", "a character device", ...). */
  kind?: string;
}

/** Synchronous ranged reads of one open file, for readers that stream very large files. */
export interface ByteRangeSource {
  readonly size: number;
  /** Up to `length` bytes starting at `offset` (fewer only at the end of the file). */
  read(offset: number, length: number): Uint8Array;
  /** Read up to `length` bytes at `offset` into `target` at `targetOffset`; returns the count (optional). */
  readInto?(offset: number, target: Uint8Array, targetOffset: number, length: number): number;
  close(): void;
}

/**
 * The contract every implementation keeps (tested for the node one in test/unit/io/):
 * - only regular files are read: `readFile`, `readHead` and `openRanged` refuse FIFOs, sockets and devices,
 *   also behind symbolic links, with a sentence and before opening them, and open in a way that cannot block;
 * - `readFile` never reads more than `maxBytes` (default: READ_LIMITS.data): a larger file is refused with a
 *   sentence, a file that grows while being read is cut at the limit;
 * - failures of the file system (permission denied, ...) are a ValleyscopeError with a sentence.
 * Confinement of paths taken from file content is a separate policy (pathPolicy.ts) built on `realpath`.
 */
export interface FileAccessor {
  readFile(path: string, maxBytes?: number): Promise<Uint8Array>;
  /** The first `bytes` bytes (or the whole file when shorter). */
  readHead(path: string, bytes: number): Promise<Uint8Array>;
  /** Follows symbolic links; null when nothing is there (or it cannot be looked at). */
  stat(path: string): Promise<FileStat | null>;
  list(dir: string): Promise<DirEntry[]>;
  /** Open a file for synchronous ranged reads (node only; absent where the file system cannot). */
  openRanged?(path: string): ByteRangeSource;
  /** The path with every symbolic link resolved, in the accessor's '/' form (absent where links cannot exist). */
  realpath?(path: string): Promise<string>;
}

/** A file's name and bytes, as handed to a reader. */
export interface InputFile {
  /** Path as the user gave it (used in messages). */
  path: string;
  /** The whole file, unless `stream` is given (then empty: a streaming reader reads through `stream`). */
  bytes: Uint8Array;
  stream?: ByteRangeSource;
}

export function basename(path: string): string {
  const p = path.replace(/[\\/]+$/, '');
  const i = Math.max(p.lastIndexOf('/'), p.lastIndexOf('\\'));
  return i >= 0 ? p.slice(i + 1) : p;
}

export function dirname(path: string): string {
  const p = path.replace(/[\\/]+$/, '');
  const i = Math.max(p.lastIndexOf('/'), p.lastIndexOf('\\'));
  if (i < 0) return '.';
  if (i === 0) return '/';
  return p.slice(0, i);
}

export function joinPath(dir: string, name: string): string {
  if (dir === '' || dir === '.') return name;
  return dir.endsWith('/') ? dir + name : `${dir}/${name}`;
}
