/**
 * Finding the runs of a workspace for the compare view: candidate files by name pattern (with the usual
 * folders left out), eigenvalue files confirmed by content with the core's detectors (src/core/load.ts
 * locateRun), and annotations files (*.valleys.json). Nothing is analysed here.
 */
import * as vscode from 'vscode';
import { locateRun } from '../core/load';
import { isAnnotationsPath } from '../core/annotations/annotationsModel';
import { WorkspaceFileAccessor } from './fileAccessor';

/** Names eigenvalue files usually have, plus the layouts that need a look inside (*.xml, *.dat, *.txt). */
export const RUN_CANDIDATES =
  '**/{EIGENVAL,EIGENVAL*,*EIGENVAL,*_EIGENVAL,*.EIGENVAL,vasprun*.xml,data-file-schema.xml,*.xml,*.dat,*.bxsf,*.bands,*.txt,*.valleys.json}';
/** Folders never searched: version control, installed packages, build output, editor caches. */
export const RUN_EXCLUDES =
  '{**/node_modules/**,**/.git/**,**/.hg/**,**/.svn/**,**/dist/**,**/out/**,**/.vscode-test/**,**/test-artifacts/**,**/__pycache__/**}';
/** At most this many candidate files are looked at. */
export const MAX_CANDIDATES = 2000;
/** Files with no tell-tale name larger than this are not opened just to look for a layout (bytes). */
const MAX_SNIFF_BYTES = 64 * 1024 * 1024;
const TELLING_NAME =
  /(^|[._-])(EIGENVAL)([._-]|$)|^vasprun.*\.xml$|^data-file-schema\.xml$|_band\.dat$|\.bxsf$|\.bands$|(^|\.)bands\.dat$/i;

export interface FoundRuns {
  /** Eigenvalue files, confirmed by content, sorted by path. */
  data: vscode.Uri[];
  /** Annotations files, sorted by path. */
  annotations: vscode.Uri[];
  /** Candidate files skipped because the search hit its limit. */
  truncated: boolean;
}

/** Runs of the whole workspace, or only those under `folder` when given. */
export async function findWorkspaceRuns(token: vscode.CancellationToken, maxBytes: number, folder?: vscode.Uri): Promise<FoundRuns> {
  const include = folder ? new vscode.RelativePattern(folder, RUN_CANDIDATES) : RUN_CANDIDATES;
  const uris = await vscode.workspace.findFiles(include, RUN_EXCLUDES, MAX_CANDIDATES, token);
  uris.sort((a, b) => (a.toString() < b.toString() ? -1 : a.toString() > b.toString() ? 1 : 0));
  const data: vscode.Uri[] = [];
  const annotations: vscode.Uri[] = [];
  for (const uri of uris) {
    if (token.isCancellationRequested) break;
    const name = uri.path.split('/').pop() ?? '';
    if (isAnnotationsPath(name)) {
      annotations.push(uri);
      continue;
    }
    if (!TELLING_NAME.test(name)) {
      try {
        const st = await vscode.workspace.fs.stat(uri);
        if (st.size > MAX_SNIFF_BYTES || st.size === 0) continue;
      } catch {
        continue;
      }
    }
    const fs = new WorkspaceFileAccessor(uri, maxBytes);
    try {
      await locateRun(fs, uri.path);
      data.push(uri);
    } catch {
      // Not an eigenvalue file of a layout the core reads (or above the size limit): not a run.
    } finally {
      fs.release();
    }
  }
  return { data, annotations, truncated: uris.length >= MAX_CANDIDATES };
}
