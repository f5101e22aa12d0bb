/** Code lenses on the first line: the gap summary (opens the readable summary) and "Open band view". */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { gapLensText } from './gapText';
import { COMMANDS } from './commandIds';
import { CancelledError } from '../core/errors';

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
    return [new vscode.CodeLens(top, { title: gapLensText(run.report, run.bs.partial), command: COMMANDS.showSummary, arguments: [doc.uri] }), open];
  }

  dispose(): void {
    this.sub.dispose();
    this.changed.dispose();
  }
}
