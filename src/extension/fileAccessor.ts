/**
 * The core's FileAccessor over `vscode.workspace.fs`, so loading works the same on a local disk, over a remote
 * (SSH, containers) and in virtual workspaces of the web editor. Paths are the URI's path component; the
 * scheme and authority of the root URI are kept, so companions are looked up beside the main file on the same
 * file system.
 */
import * as vscode from 'vscode';
import type { DirEntry, FileAccessor } from '../core/io/fileAccessor';
import { ValleyscopeError } from '../core/errors';
import { open } from 'node:fs/promises';

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

  async readFile(path: string): Promise<Uint8Array> {
    if (this.pending?.path === path) {
      const bytes = this.pending.bytes;
      this.pending = null;
      return bytes;
    }
    const uri = this.uri(path);
    await this.checkSize(uri, path);
    return vscode.workspace.fs.readFile(uri);
  }

  async readHead(path: string, bytes: number): Promise<Uint8Array> {
    const uri = this.uri(path);
    // Local files (desktop, and the remote side of SSH/containers): a ranged read, so detecting the layout of
    // a large file in a run folder (OUTCAR, vasprun.xml) does not read all of it.
    const ranged = await rangedHead(uri, bytes);
    if (ranged) return ranged;
    // Other file systems read whole files only: keep what was read, so the read that usually follows
    // detection does not read the file a second time.
    await this.checkSize(uri, path);
    const all = await vscode.workspace.fs.readFile(uri);
    this.pending = { path, bytes: all };
    return all.subarray(0, Math.min(bytes, all.length));
  }

  /** Throws the size sentence when the file is above the user's limit. */
  async checkSize(uri: vscode.Uri, path: string): Promise<void> {
    if (this.maxBytes <= 0) return;
    const st = await vscode.workspace.fs.stat(uri);
    if (st.size > this.maxBytes) {
      throw new ValleyscopeError(
        `${path}: the file is ${(st.size / 1e6).toFixed(0)} MB, above the limit of ${(this.maxBytes / 1e6).toFixed(0)} MB (setting valleyscope.maxFileSizeMB)`,
      );
    }
  }

  /** Forget a kept read (call when loading ends, so the bytes can be freed). */
  release(): void {
    this.pending = null;
  }

  async stat(path: string): Promise<{ type: 'file' | 'directory'; size: number } | null> {
    try {
      const s = await vscode.workspace.fs.stat(this.uri(path));
      return { type: s.type & vscode.FileType.Directory ? 'directory' : 'file', size: s.size };
    } catch {
      return null;
    }
  }

  async list(dir: string): Promise<DirEntry[]> {
    const entries = await vscode.workspace.fs.readDirectory(this.uri(dir));
    const out: DirEntry[] = [];
    for (const [name, type] of entries) {
      if (type & vscode.FileType.Directory) out.push({ name, type: 'directory' });
      else if (type & vscode.FileType.File) out.push({ name, type: 'file' });
    }
    return out;
  }
}

/** The first `bytes` bytes of a local file through node, or null where node's file system is not available. */
async function rangedHead(uri: vscode.Uri, bytes: number): Promise<Uint8Array | null> {
  if (uri.scheme !== 'file' || !open) return null;
  try {
    const fh = await open(uri.fsPath, 'r');
    try {
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
