/**
 * The analysis summary as a read-only virtual document: it opens like a text file, can be copied from and
 * searched, and closing it never asks to save (it is not an untitled buffer). Refreshed when the run changes.
 */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { summaryText } from '../core/report/summaryText';
import { runTitle } from './runTitle';

export const SUMMARY_SCHEME = 'valleyscope-summary';

/** The summary document's URI for a run: a readable path (shown in the tab) and the run's URI in the query. */
export function summaryUri(run: vscode.Uri): vscode.Uri {
  return vscode.Uri.from({ scheme: SUMMARY_SCHEME, path: `/${runTitle(run.path)} (summary)`, query: run.toString() });
}

export class SummaryDocuments implements vscode.TextDocumentContentProvider, vscode.Disposable {
  private readonly changed = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.changed.event;
  private readonly subs: vscode.Disposable[];

  constructor(private readonly store: RunStore) {
    this.subs = [
      vscode.workspace.registerTextDocumentContentProvider(SUMMARY_SCHEME, this),
      store.onDidChange((run) => {
        const uri = summaryUri(run);
        if (vscode.workspace.textDocuments.some((d) => d.uri.toString() === uri.toString())) this.changed.fire(uri);
      }),
    ];
  }

  async provideTextDocumentContent(uri: vscode.Uri): Promise<string> {
    let run: vscode.Uri;
    try {
      run = vscode.Uri.parse(uri.query, true);
    } catch {
      return 'This summary link does not name a run.';
    }
    try {
      const loaded = await this.store.get(run);
      return summaryText(loaded.report);
    } catch (e) {
      return `The run ${runTitle(run.path)} could not be analysed: ${e instanceof Error ? e.message : String(e)}`;
    }
  }

  dispose(): void {
    for (const s of this.subs) s.dispose();
    this.changed.dispose();
  }
}
