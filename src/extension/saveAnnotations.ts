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
import { composeAnnotations, type ChosenFit, type Composed } from '../core/annotations/composeAnnotations';
import { mergeAndWrite } from '../core/annotations/atomicWrite';
import { atomicWriterOver } from './atomicWrite';
import { annotationsTarget, currentText, workspaceAtomicFs, writeThroughEditor } from './annotationsWriter';
import { writeRefusal } from './trust';
import { annotationsSaveRefusal } from '../core/annotations/saveRefusal';

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
  const notHere = annotationsSaveRefusal(run.bs);
  if (notHere) return { ok: false, message: notHere };
  const fits: ChosenFit[] = [];
  for (const e of m.entries) {
    const problem = targetProblem(run, e);
    if (problem) return { ok: false, message: `Not saved: ${problem}.` };
    // Only where and how: the core redoes each fit (chosenFits.ts), exactly as `check` will.
    const at = {
      spin: e.spin,
      kIndex: e.kIndex,
      band0: e.band0,
      window_meV: e.window_meV,
      method: e.method,
      ...(typeof e.maximum === 'boolean' ? { maximum: e.maximum } : {}),
    };
    fits.push(e.note !== undefined ? { ...at, note: e.note } : at);
  }
  const settings = deps.settings().analysis;
  const target = annotationsTarget(run.fileUri);
  const name = target.uri.path.split('/').pop() ?? target.uri.path;
  const compose = (existingText: string | null): Composed => {
    let c: Composed;
    try {
      c = composeAnnotations({
        bs: run.bs,
        report: run.report,
        source: run.bs.source,
        settings,
        toolVersion: deps.toolVersion,
        fits,
        ...(m.notes !== undefined ? { runNote: m.notes } : {}),
        existingText,
        existingName: name,
        fit: deps.fits.cachedFitter(run),
      });
    } catch (e) {
      throw new UnreadableExisting(e);
    }
    for (const w of c.warnings) deps.log.info(`${name}: ${w}`);
    return c;
  };
  const rel = vscode.workspace.asRelativePath(target.uri);
  const done = (c: Composed, leftUnsaved: boolean): SaveOutcome => {
    const kept = c.counts.notFound ? `, ${c.counts.notFound} kept from before that this analysis no longer finds` : '';
    const entries = plural(c.counts.entries, 'entry', 'entries');
    if (leftUnsaved) {
      return {
        ok: true,
        message: `Merged ${entries} into the open editor of ${rel}${kept}. Not on disk yet: that editor has unsaved edits of yours, so save it to write the file.`,
        uri: target.uri,
      };
    }
    return { ok: true, message: `Saved ${entries} to ${rel}${kept}.`, uri: target.uri };
  };

  // Open in an editor: merge with the editor's text (unsaved hand edits included) through a workspace edit.
  if (target.document) {
    let c: Composed;
    try {
      c = compose(target.document.getText());
    } catch (e) {
      return refusedToRead(name, e instanceof UnreadableExisting ? e.cause : e);
    }
    try {
      return done(c, (await writeThroughEditor(target.document, c.text)) === 'left-unsaved');
    } catch (e) {
      return { ok: false, message: `Not saved: ${name} could not be written (${message(e)}).` };
    }
  }

  // Otherwise on disk: read, merge, write atomically; merge again if the file changed meanwhile.
  try {
    const out = await mergeAndWrite(
      atomicWriterOver(workspaceAtomicFs(target.uri)),
      target.uri.path,
      () => currentText(target),
      compose,
      ATTEMPTS,
    );
    if (out.status === 'written') return done(out.result, false);
    return { ok: false, message: `Not saved: ${name} kept changing on disk while saving; try again.` };
  } catch (e) {
    if (e instanceof UnreadableExisting) return refusedToRead(name, e.cause);
    return { ok: false, message: `Not saved: ${name} could not be written (${message(e)}). The file on disk is as it was.` };
  }
}

/** The annotations file as it stands could not be read (so it must not be overwritten). */
class UnreadableExisting extends Error {
  constructor(override readonly cause: unknown) {
    super(cause instanceof Error ? cause.message : String(cause));
  }
}

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`;
}

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** The existing file cannot be read (bad JSON from a hand edit, a newer layout): it is never overwritten. */
function refusedToRead(name: string, e: unknown): SaveOutcome {
  return { ok: false, message: `Not saved, ${name} was left as it is: ${message(e)}` };
}
