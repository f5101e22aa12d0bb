/**
 * How the core sees files, without importing any file system: the CLI passes a node implementation, the
 * extension one over `vscode.workspace.fs` (local, remote and virtual workspaces alike).
 * Paths are strings with '/' separators, interpreted only by the accessor.
 */

export interface DirEntry {
  name: string;
  type: 'file' | 'directory';
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

export interface FileAccessor {
  readFile(path: string): Promise<Uint8Array>;
  /** The first `bytes` bytes (or the whole file when shorter). */
  readHead(path: string, bytes: number): Promise<Uint8Array>;
  stat(path: string): Promise<{ type: 'file' | 'directory'; size: number } | null>;
  list(dir: string): Promise<DirEntry[]>;
  /** Open a file for synchronous ranged reads (node only; absent where the file system cannot). */
  openRanged?(path: string): ByteRangeSource;
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
