/** Status-bar item with the active file's gap ("Gap 1.12 eV indirect", "Metal"). */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { gapStatusText, gapTooltip } from './gapText';
import { COMMANDS } from './commandIds';
import { isEigenvalueLanguage } from './languageIds';
import { CancelledError } from '../core/errors';

export class GapStatusItem implements vscode.Disposable {
  private readonly item = vscode.window.createStatusBarItem('valleyscope.gap', vscode.StatusBarAlignment.Right, 100);
  private readonly subs: vscode.Disposable[] = [];
  /** The run shown when no eigenvalue editor is active (the focused band view's). */
  private panelUri: vscode.Uri | null = null;

  constructor(private readonly store: RunStore) {
    this.item.name = 'Valleyscope band gap';
    this.subs.push(
      vscode.window.onDidChangeActiveTextEditor(() => this.update()),
      store.onDidChange(() => this.update()),
    );
    this.update();
  }

  /** The band view that has focus tells the item which run to show (null when it loses focus). */
  setPanelRun(uri: vscode.Uri | null): void {
    this.panelUri = uri;
    this.update();
  }

  private currentUri(): vscode.Uri | null {
    const ed = vscode.window.activeTextEditor;
    if (ed && isEigenvalueLanguage(ed.document.languageId)) return ed.document.uri;
    return this.panelUri;
  }

  update(): void {
    const uri = this.currentUri();
    if (!uri) {
      this.item.hide();
      return;
    }
    const state = this.store.state(uri);
    this.item.command = { command: COMMANDS.openBandView, title: 'Open band view', arguments: [uri] };
    if (!state) {
      void this.store.get(uri).catch(() => undefined);
      this.item.text = 'Valleyscope: reading…';
      this.item.tooltip = undefined;
    } else if (state.status === 'loading') {
      this.item.text = 'Valleyscope: reading…';
      this.item.tooltip = undefined;
    } else if (state.status === 'failed') {
      this.item.text = state.error instanceof CancelledError ? 'Valleyscope: cancelled' : 'Valleyscope: unreadable';
      this.item.tooltip = state.error instanceof Error ? state.error.message : String(state.error);
      this.item.command = { command: COMMANDS.reload, title: 'Read again', arguments: [uri] };
    } else {
      this.item.text = gapStatusText(state.run.report, state.run.bs.partial);
      this.item.tooltip = gapTooltip(state.run.report, state.run.bs.partial);
    }
    this.item.show();
  }

  dispose(): void {
    for (const s of this.subs) s.dispose();
    this.item.dispose();
  }
}
