/**
 * The compare view's runs: found in the workspace (compareViewRuns.ts), each data file read and analysed by
 * the run store (the band view's runner and worker), annotations files read as runs of their own
 * (core/compare/loadAnnotationsRun.ts) or as the flag of the data run beside them.
 */
import * as vscode from 'vscode';
import type { CompareDeps } from './compareViewPanel';
import { findWorkspaceRuns } from './compareViewRuns';
import type { CompareEntry } from './compareViewData';
import { WorkspaceFileAccessor } from './fileAccessor';
import { loadAnnotationsRun, type LoadedAnnotationsRun } from '../core/compare/loadAnnotationsRun';
import { dataPathFor } from '../core/annotations/annotationsModel';
import { dataRunInput } from '../core/compare/dataRunInput';

export interface Found {
  entry: CompareEntry;
  /** The eigenvalue file to draw and open in a band view (null when there is none). */
  dataUri: vscode.Uri | null;
  /** The file opened by "open file". */
  fileUri: vscode.Uri;
}

export interface WorkspaceRuns {
  found: Found[];
  /** Candidate files looked at, and whether the workspace has more. */
  candidates: number;
  truncated: boolean;
}

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** Every run of the workspace, read; null when cancelled. `progress(total, done, text)` reports as it goes. */
export async function readWorkspaceRuns(
  deps: CompareDeps,
  token: vscode.CancellationToken,
  annotationsAsRuns: boolean,
  progress: (found: number, done: number, text: string) => void,
): Promise<WorkspaceRuns | null> {
  progress(0, 0, 'Looking for runs in the workspace …');
  const s = deps.settings();
  const runs = await findWorkspaceRuns(token, s.maxBytes);
  if (token.isCancellationRequested) return null;
  const annotationsByData = new Map(runs.annotations.map((u) => [dataPathFor(u.path), u]));
  const found: Found[] = [];
  let n = 0;
  const nextId = (): string => `r${n++}`;
  const total = runs.data.length + runs.annotations.length;
  let done = 0;
  const tick = (what: string): void => progress(total, ++done, `Read ${done} of ${total}: ${what}`);
  const annotationsCache = new Map<string, LoadedAnnotationsRun | Error>();
  const readAnnotations = async (u: vscode.Uri): Promise<LoadedAnnotationsRun | Error> => {
    const key = u.toString();
    const have = annotationsCache.get(key);
    if (have) return have;
    const fs = new WorkspaceFileAccessor(u, s.maxBytes);
    let out: LoadedAnnotationsRun | Error;
    try {
      out = await loadAnnotationsRun(fs, u.path, vscode.workspace.asRelativePath(u));
    } catch (e) {
      out = e instanceof Error ? e : new Error(String(e));
    } finally {
      fs.release();
    }
    annotationsCache.set(key, out);
    return out;
  };
  for (const uri of runs.data) {
    if (token.isCancellationRequested) return null;
    const name = vscode.workspace.asRelativePath(uri);
    const beside = annotationsByData.get(uri.path) ?? null;
    let annotations: CompareEntry['annotations'] = 'none';
    let staleReasons: string[] = [];
    if (beside) {
      const a = await readAnnotations(beside);
      if (a instanceof Error) {
        annotations = 'stale';
        staleReasons = [`the annotations file could not be read: ${a.message}`];
      } else {
        annotations = a.run.stale ? 'stale' : 'current';
        staleReasons = a.staleReasons;
      }
    }
    const id = nextId();
    try {
      const run = await deps.store.get(uri);
      found.push({
        entry: {
          id,
          name,
          origin: 'data',
          annotations,
          staleReasons,
          run: dataRunInput(id, run.bs, run.report),
          error: null,
          canOverlay: true,
        },
        dataUri: uri,
        fileUri: uri,
      });
    } catch (e) {
      found.push({
        entry: { id, name, origin: 'data', annotations, staleReasons, run: null, error: message(e), canOverlay: false },
        dataUri: uri,
        fileUri: uri,
      });
    }
    tick(name);
  }
  const dataPaths = new Set(runs.data.map((u) => u.path));
  for (const uri of runs.annotations) {
    if (token.isCancellationRequested) return null;
    const dataPath = dataPathFor(uri.path);
    const hasData = dataPaths.has(dataPath);
    // Beside a data run the annotations show as its flag; as a row of their own on request, or when the
    // data file is gone or unreadable.
    const dataReadable = hasData && found.some((f) => f.dataUri?.path === dataPath && f.entry.run !== null);
    if (!annotationsAsRuns && dataReadable) {
      tick(vscode.workspace.asRelativePath(uri));
      continue;
    }
    const a = await readAnnotations(uri);
    const name = vscode.workspace.asRelativePath(uri);
    const id = nextId();
    const dataUri = hasData ? uri.with({ path: dataPath }) : null;
    if (a instanceof Error) {
      found.push({
        entry: {
          id,
          name,
          origin: 'annotations',
          annotations: 'stale',
          staleReasons: [],
          run: null,
          error: a.message,
          canOverlay: false,
        },
        dataUri,
        fileUri: uri,
      });
    } else {
      found.push({
        entry: {
          id,
          name,
          origin: 'annotations',
          annotations: a.run.stale ? 'stale' : 'current',
          staleReasons: a.staleReasons,
          run: { ...a.run, name: id },
          error: null,
          canOverlay: dataReadable,
        },
        dataUri,
        fileUri: uri,
      });
    }
    tick(name);
  }
  if (token.isCancellationRequested) return null;
  return { found, candidates: runs.data.length + runs.annotations.length, truncated: runs.truncated };
}
