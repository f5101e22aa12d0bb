/** Code lenses on the first line: the gap summary (opens the readable summary) and "Open band view". */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { gapLensText } from './gapText';
import { COMMANDS } from './commandIds';
import { CancelledError } from '../core/errors';
import { dataPathFor, isAnnotationsPath } from '../core/annotations/annotationsModel';

export class GapCodeLensProvider implements vscode.CodeLensProvider {
  private readonly changed = new vscode.EventEmitter<void>();
  readonly onDidChangeCodeLenses = this.changed.event;
  private readonly sub: vscode.Disposable;

  constructor(private readonly store: RunStore) {
    this.sub = store.onDidChange(() => this.changed.fire());
  }

  provideCodeLenses(doc: vscode.TextDocument): vscode.CodeLens[] {
    const top = new vscode.Range(0, 0, 0, 0);
    const open = new vscode.CodeLens(top, { title: 'Open band view', command: COMMANDS.openBandView, arguments: [doc.uri] });
    const state = this.store.state(doc.uri);
    if (!state) {
      void this.store.get(doc.uri).catch(() => undefined);
      return [new vscode.CodeLens(top, { title: 'Valleyscope: reading…', command: '' }), open];
    }
    if (state.status === 'loading') return [new vscode.CodeLens(top, { title: 'Valleyscope: reading…', command: '' }), open];
    if (state.status === 'failed') {
      const why = state.error instanceof CancelledError ? 'reading cancelled' : 'this file could not be read (see Problems)';
      return [new vscode.CodeLens(top, { title: `Valleyscope: ${why}`, command: COMMANDS.reload, arguments: [doc.uri] })];
    }
    const run = state.run;
    return [
      new vscode.CodeLens(top, { title: gapLensText(run.report, run.bs.partial), command: COMMANDS.showSummary, arguments: [doc.uri] }),
      open,
    ];
  }

  dispose(): void {
    this.sub.dispose();
    this.changed.dispose();
  }
}

/** On an annotations file (`<data>.valleys.json`): a lens that opens the band view of its data file. */
export class AnnotationsCodeLensProvider implements vscode.CodeLensProvider {
  provideCodeLenses(doc: vscode.TextDocument): vscode.CodeLens[] {
    const path = doc.uri.path;
    if (!isAnnotationsPath(path)) return [];
    // The data file is named by the annotations file's own name, never by its content.
    const data = doc.uri.with({ path: dataPathFor(path) });
    const name = data.path.split('/').pop() ?? data.path;
    return [
      new vscode.CodeLens(new vscode.Range(0, 0, 0, 0), {
        title: `Open band view of ${name}`,
        command: COMMANDS.openBandView,
        arguments: [data],
      }),
    ];
  }
}
