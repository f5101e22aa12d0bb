/**
 * Save from the band view: recompute the chosen fits with the core (the view sends only which extrema and
 * which fit settings), merge with the annotations file as it stands (the open editor's text, unsaved edits
 * included, or the file on disk) and write it back. Refused in restricted workspaces.
 */
import * as vscode from 'vscode';
import type { SaveMessage } from '../protocol';
import type { LoadedRun } from './runLoader';
import type { ExtensionSettings } from './settings';
import type { FitService } from './fitTypes';
import { targetProblem } from './fitTypes';
import { composeAnnotations, type ChosenFit } from './annotationsCompose';
import { annotationsTarget, currentText, writeThroughEditor, writeThroughFs } from './annotationsWriter';
import { writeRefusal } from './trust';

export interface SaveOutcome {
  ok: boolean;
  message: string;
  uri?: vscode.Uri;
}

export interface SaveDeps {
  settings: () => ExtensionSettings;
  fits: FitService;
  toolVersion: string;
  log: vscode.LogOutputChannel;
}

const ATTEMPTS = 3;

export async function saveAnnotations(run: LoadedRun, m: SaveMessage, deps: SaveDeps): Promise<SaveOutcome> {
  const refusal = writeRefusal(run.fileUri);
  if (refusal) return { ok: false, message: refusal };
  if (run.bs.partial) {
    return { ok: false, message: 'Not saved: the file is incomplete (a running job?), so its numbers are provisional. Save once the run has finished.' };
  }
  const fits: ChosenFit[] = [];
  for (const e of m.entries) {
    const problem = targetProblem(run, e);
    if (problem) return { ok: false, message: `Not saved: ${problem}.` };
    const out = deps.fits.fit(run, e, e.window_meV, e.method, false);
    fits.push(e.note !== undefined ? { extremum: out.extremum, note: e.note } : { extremum: out.extremum });
  }
  const settings = deps.settings().analysis;
  const target = annotationsTarget(run.fileUri);
  const name = target.uri.path.split('/').pop() ?? target.uri.path;
  for (let attempt = 1; attempt <= ATTEMPTS; attempt++) {
    let composed;
    let mtime: number | null;
    try {
      const cur = await currentText(target);
      mtime = cur.mtime;
      composed = composeAnnotations({
        report: run.report,
        source: run.bs.source,
        settings,
        toolVersion: deps.toolVersion,
        fits,
        ...(m.notes !== undefined ? { runNote: m.notes } : {}),
        existingText: cur.text,
        existingName: name,
      });
    } catch (e) {
      // The existing file cannot be read (bad JSON from a hand edit, a newer layout): never overwrite it.
      return { ok: false, message: `Not saved, ${name} was left as it is: ${e instanceof Error ? e.message : String(e)}` };
    }
    for (const w of composed.warnings) deps.log.info(`${name}: ${w}`);
    let leftUnsaved = false;
    try {
      if (target.document) {
        leftUnsaved = (await writeThroughEditor(target.document, composed.text)) === 'left-unsaved';
      } else {
        const r = await writeThroughFs(target.uri, composed.text, mtime);
        if (r === 'changed-on-disk') {
          deps.log.info(`${name} changed on disk while saving: merging again (attempt ${attempt})`);
          continue;
        }
      }
    } catch (e) {
      const where = target.document ? 'in the open editor' : 'on disk';
      return { ok: false, message: `Not saved: ${name} could not be written (${e instanceof Error ? e.message : String(e)}). The file ${where} is as it was before, or holds the merge if the editor took it.` };
    }
    const c = composed.counts;
    const kept = c.notFound ? `, ${c.notFound} kept from before that this analysis no longer finds` : '';
    const rel = vscode.workspace.asRelativePath(target.uri);
    if (leftUnsaved) {
      return { ok: true, message: `Merged ${c.entries} entries into the open editor of ${rel}${kept}; it has unsaved edits of yours, so save it to write the file.`, uri: target.uri };
    }
    return { ok: true, message: `Saved ${c.entries} entries to ${rel}${kept}.`, uri: target.uri };
  }
  return { ok: false, message: `Not saved: ${name} kept changing on disk while saving; try again.` };
}
