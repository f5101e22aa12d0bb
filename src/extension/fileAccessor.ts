/**
 * The core's FileAccessor over `vscode.workspace.fs`, so loading works the same on a local disk, over a remote
 * (SSH, containers) and in virtual workspaces of the web editor. Paths are the URI's path component; the
 * scheme and authority of the root URI are kept, so companions are looked up beside the main file on the same
 * file system.
 *
 * It keeps the contract of core/io/fileAccessor.ts, as the CLI's accessor does: only regular files are read
 * (a FIFO, socket or device is refused by type before it is opened, also behind a link), every whole-file
 * read is bounded (the user's valleyscope.maxFileSizeMB, or the smaller limit of the role the caller passes),
 * and on local files `realpath` resolves links so the core's path policy (core/io/pathPolicy.ts) can confine
 * companions and paths from annotations files to the run's folder.
 */
import * as vscode from 'vscode';
import type { DirEntry, FileAccessor, FileStat } from '../core/io/fileAccessor';
import { ValleyscopeError } from '../core/errors';
import { READ_LIMITS, tooLargeSentence } from '../core/io/readLimits';
import { notRegularSentence } from '../core/io/pathPolicy';
import { entryKindOf } from '../core/io/entryKind';
import { constants as fsc, open, realpath, stat as nodeStat } from 'node:fs/promises';

/** Non-blocking open: a FIFO swapped in after the type check cannot hang the extension host. */
const NONBLOCKING_READ = (fsc?.O_RDONLY ?? 0) | (fsc?.O_NONBLOCK ?? 0) | (fsc?.O_NOCTTY ?? 0);

export class WorkspaceFileAccessor implements FileAccessor {
  /** `maxBytes` (0: none) refuses files above the user's size limit before they are read. */
  constructor(
    private readonly root: vscode.Uri,
    private readonly maxBytes = 0,
  ) {}

  /** The URI of a path as the core writes it. */
  uri(path: string): vscode.Uri {
    return this.root.with({ path });
  }

  /** The last whole file read for a head (workspace.fs has no ranged read): handed to the next readFile. */
  private pending: { path: string; bytes: Uint8Array } | null = null;

  private limit(maxBytes?: number): number {
    const user = this.maxBytes > 0 ? this.maxBytes : READ_LIMITS.data;
    return maxBytes !== undefined && maxBytes > 0 ? Math.min(maxBytes, user) : user;
  }

  async readFile(path: string, maxBytes?: number): Promise<Uint8Array> {
    const limit = this.limit(maxBytes);
    if (this.pending?.path === path) {
      const bytes = this.pending.bytes;
      this.pending = null;
      if (bytes.length > limit) throw new ValleyscopeError(tooLargeSentence(path, bytes.length, limit));
      return bytes;
    }
    const uri = this.uri(path);
    await this.checkReadable(uri, path, limit);
    return vscode.workspace.fs.readFile(uri);
  }

  async readHead(path: string, bytes: number): Promise<Uint8Array> {
    const uri = this.uri(path);
    // Local files (desktop, and the remote side of SSH/containers): a ranged read, so detecting the layout of
    // a large file in a run folder (OUTCAR, vasprun.xml) does not read all of it.
    if (uri.scheme === 'file' && typeof open === 'function') {
      await this.checkReadable(uri, path, Number.MAX_SAFE_INTEGER);
      const ranged = await rangedHead(uri, bytes);
      if (ranged) return ranged;
    }
    // Other file systems read whole files only: keep what was read, so the read that usually follows
    // detection does not read the file a second time.
    await this.checkReadable(uri, path, this.limit());
    const all = await vscode.workspace.fs.readFile(uri);
    this.pending = { path, bytes: all };
    return all.subarray(0, Math.min(bytes, all.length));
  }

  /** Throws the size sentence when the file is above the user's limit. */
  async checkSize(uri: vscode.Uri, path: string): Promise<void> {
    await this.checkReadable(uri, path, this.limit());
  }

  /** A regular file no larger than `limit`, or a ValleyscopeError sentence; nothing is opened here. */
  private async checkReadable(uri: vscode.Uri, path: string, limit: number): Promise<void> {
    const st = await this.statUri(uri);
    if (!st) throw new ValleyscopeError(`${path}: there is no such file`);
    if (st.type !== 'file') throw new ValleyscopeError(notRegularSentence(path, st));
    if (st.size > limit) {
      const setting = limit === this.maxBytes ? 'setting valleyscope.maxFileSizeMB' : undefined;
      throw new ValleyscopeError(tooLargeSentence(path, st.size, limit, undefined, setting));
    }
  }

  /** Forget a kept read (call when loading ends, so the bytes can be freed). */
  release(): void {
    this.pending = null;
  }

  async stat(path: string): Promise<FileStat | null> {
    return this.statUri(this.uri(path));
  }

  private async statUri(uri: vscode.Uri): Promise<FileStat | null> {
    if (uri.scheme === 'file' && nodeStat) {
      // node tells a FIFO from a device; workspace.fs calls both "unknown".
      try {
        const s = await nodeStat(uri.fsPath);
        return { ...entryKindOf(s), size: s.size };
      } catch {
        return null;
      }
    }
    try {
      const s = await vscode.workspace.fs.stat(uri);
      const type = s.type & vscode.FileType.Directory ? 'directory' : s.type & vscode.FileType.File ? 'file' : 'other';
      return { type, size: s.size };
    } catch {
      return null;
    }
  }

  /** Links resolved, for local files; elsewhere (virtual file systems) the path as it is. */
  async realpath(path: string): Promise<string> {
    const uri = this.uri(path);
    if (uri.scheme === 'file' && realpath) {
      const real = await realpath(uri.fsPath);
      return real.replace(/\\/g, '/');
    }
    return path;
  }

  async list(dir: string): Promise<DirEntry[]> {
    const entries = await vscode.workspace.fs.readDirectory(this.uri(dir));
    const out: DirEntry[] = [];
    for (const [name, type] of entries) {
      const link = (type & vscode.FileType.SymbolicLink) !== 0;
      if (type & vscode.FileType.Directory) out.push({ name, type: 'directory', link });
      else if (type & vscode.FileType.File) out.push({ name, type: 'file', link });
      else out.push({ name, type: 'other', link });
    }
    return out;
  }
}

/** The first `bytes` bytes of a local file through node, or null where node's file system is not available. */
async function rangedHead(uri: vscode.Uri, bytes: number): Promise<Uint8Array | null> {
  if (uri.scheme !== 'file' || !open) return null;
  try {
    const fh = await open(uri.fsPath, NONBLOCKING_READ);
    try {
      if (!(await fh.stat()).isFile()) return null;
      const buf = new Uint8Array(bytes);
      const { bytesRead } = await fh.read(buf, 0, bytes, 0);
      return buf.subarray(0, bytesRead);
    } finally {
      await fh.close();
    }
  } catch {
    return null;
  }
}
