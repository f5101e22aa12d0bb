/**
 * The few parts of the `vscode` API that the workspace file accessor uses, over node's file system, for
 * tests that run outside VS Code. Behaves as VS Code's disk provider does: `stat` follows links and adds the
 * SymbolicLink flag, and anything that is neither a file nor a folder (a FIFO, a device) is `Unknown`.
 * Any scheme maps to the local disk, so a non-`file` scheme exercises the accessor's virtual-file-system path.
 */
import { lstatSync, promises as fsp, statSync } from 'node:fs';
import { join } from 'node:path';

export enum FileType {
  Unknown = 0,
  File = 1,
  Directory = 2,
  SymbolicLink = 64,
}

export class FileSystemError extends Error {
  constructor(
    message: string,
    readonly code: string,
  ) {
    super(message);
  }
}

export class Uri {
  private constructor(
    readonly scheme: string,
    readonly path: string,
  ) {}
  static from(c: { scheme: string; path: string }): Uri {
    return new Uri(c.scheme, c.path);
  }
  static file(path: string): Uri {
    return new Uri('file', path);
  }
  get fsPath(): string {
    return this.path;
  }
  with(change: { path?: string }): Uri {
    return new Uri(this.scheme, change.path ?? this.path);
  }
  toString(): string {
    return `${this.scheme}://${this.path}`;
  }
}

function typeOf(path: string): FileType {
  const l = lstatSync(path);
  const s = statSync(path);
  const t = s.isFile() ? FileType.File : s.isDirectory() ? FileType.Directory : FileType.Unknown;
  return l.isSymbolicLink() ? t | FileType.SymbolicLink : t;
}

/** Paths whose reads were requested: a test can check that nothing refused was ever read. */
export const readLog: string[] = [];

export const workspace = {
  textDocuments: [] as unknown[],
  fs: {
    async stat(uri: Uri): Promise<{ type: FileType; size: number; mtime: number; ctime: number }> {
      try {
        const s = statSync(uri.path);
        return { type: typeOf(uri.path), size: s.size, mtime: s.mtimeMs, ctime: s.ctimeMs };
      } catch {
        throw new FileSystemError(`${uri.path} not found`, 'FileNotFound');
      }
    },
    async readFile(uri: Uri): Promise<Uint8Array> {
      readLog.push(uri.path);
      return new Uint8Array(await fsp.readFile(uri.path));
    },
    async readDirectory(uri: Uri): Promise<[string, FileType][]> {
      const out: [string, FileType][] = [];
      for (const name of await fsp.readdir(uri.path)) {
        try {
          out.push([name, typeOf(join(uri.path, name))]);
        } catch {
          out.push([name, FileType.SymbolicLink]); // a dangling link
        }
      }
      return out;
    },
  },
};
