/**
 * The compare view, host side: one panel for the workspace. Reads the workspace's runs (compareViewScan.ts),
 * builds the table (compareViewData.ts), sends band data for overlays, and opens runs. Every message from the
 * view is validated against the protocol first.
 */
import * as vscode from 'vscode';
import {
  COMPARE_MAX_OVERLAY,
  CompareHostToViewType,
  CompareViewToHostType,
  isCompareViewToHostMessage,
  type CompareBandRun,
  type CompareHostToViewMessage,
  type CompareViewToHostMessage,
} from '../protocol';
import type { RunStore } from './runStore';
import type { ExtensionSettings } from './settings';
import { bandViewHtml, makeNonce } from './bandViewHtml';
import { environmentFor } from './trust';
import { COMMANDS } from './commandIds';
import { bandRunOf, buildCompareTable } from './compareViewData';
import { readWorkspaceRuns, type Found } from './compareViewScan';
import { dataRunInput } from '../core/compare/dataRunInput';

export const COMPARE_VIEW_TYPE = 'valleyscope.compareView';
export const OPEN_COMPARE_VIEW_COMMAND = 'valleyscope.openCompareView';
const TITLE = 'Valleyscope: Run Comparison';

export interface CompareDeps {
  store: RunStore;
  extensionUri: vscode.Uri;
  log: vscode.LogOutputChannel;
  settings: () => ExtensionSettings;
  /** The workspace's memory: the chosen reference run is kept there across sessions. */
  memory?: vscode.Memento;
}

/** Key of the remembered reference (the run's workspace-relative name). */
export const REFERENCE_MEMORY_KEY = 'valleyscope.compare.reference';

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

export class CompareViewPanel implements vscode.Disposable {
  private static current: CompareViewPanel | null = null;
  private readonly subs: vscode.Disposable[] = [];
  private ready = false;
  private disposed = false;
  private found: Found[] = [];
  private referenceId: string | null = null;
  private annotationsAsRuns = false;
  private scan: vscode.CancellationTokenSource | null = null;
  private rebuildTimer: ReturnType<typeof setTimeout> | null = null;
  /** Tests and the editor scenarios read how many runs the last table had. */
  lastRowCount = 0;

  private constructor(
    readonly panel: vscode.WebviewPanel,
    private readonly deps: CompareDeps,
  ) {
    this.subs.push(
      panel.webview.onDidReceiveMessage((m: unknown) => void this.receive(m)),
      panel.onDidDispose(() => this.dispose()),
      // A run re-read (file changed, settings changed): rebuild the table once things settle.
      deps.store.onDidChange((uri) => {
        if (this.found.some((f) => f.dataUri?.toString() === uri.toString())) this.scheduleRebuild();
      }),
      vscode.window.onDidChangeActiveColorTheme(() => this.scheduleRebuild()),
    );
  }

  static async show(deps: CompareDeps): Promise<CompareViewPanel> {
    if (CompareViewPanel.current) {
      CompareViewPanel.current.panel.reveal(undefined, false);
      return CompareViewPanel.current;
    }
    const panel = vscode.window.createWebviewPanel(COMPARE_VIEW_TYPE, TITLE, vscode.ViewColumn.Active, CompareViewPanel.options(deps));
    return CompareViewPanel.attach(panel, deps);
  }

  /** A panel VS Code restored after a reload of the window: give it its page again, and look for runs anew. */
  static async revive(panel: vscode.WebviewPanel, deps: CompareDeps): Promise<CompareViewPanel> {
    CompareViewPanel.current?.dispose();
    panel.webview.options = CompareViewPanel.options(deps);
    return CompareViewPanel.attach(panel, deps);
  }

  private static options(deps: CompareDeps): vscode.WebviewPanelOptions & vscode.WebviewOptions {
    return {
      enableScripts: true,
      retainContextWhenHidden: true,
      localResourceRoots: [vscode.Uri.joinPath(deps.extensionUri, 'dist', 'webview')],
      enableFindWidget: true,
    };
  }

  private static async attach(panel: vscode.WebviewPanel, deps: CompareDeps): Promise<CompareViewPanel> {
    const script = vscode.Uri.joinPath(deps.extensionUri, 'dist', 'webview', 'compareView.js');
    try {
      await vscode.workspace.fs.stat(script);
    } catch {
      deps.log.error(`the compare view script ${script.toString(true)} is missing: run the build (npm run build)`);
    }
    panel.webview.html = bandViewHtml({
      cspSource: panel.webview.cspSource,
      nonce: makeNonce(),
      scriptUri: panel.webview.asWebviewUri(script).toString(),
      title: TITLE,
    });
    CompareViewPanel.current = new CompareViewPanel(panel, deps);
    return CompareViewPanel.current;
  }

  private post(m: CompareHostToViewMessage): void {
    if (!this.disposed) void this.panel.webview.postMessage(m);
  }

  private async receive(raw: unknown): Promise<void> {
    if (!isCompareViewToHostMessage(raw)) {
      const t = typeof raw === 'object' && raw !== null && 'type' in raw ? String(raw.type).slice(0, 40) : typeof raw;
      this.deps.log.warn(`compare view: a message that does not follow the protocol was dropped (type ${t})`);
      return;
    }
    try {
      await this.handle(raw);
    } catch (e) {
      this.deps.log.error(`compare view: ${raw.type}: ${message(e)}`);
      this.post({ type: CompareHostToViewType.Notice, message: message(e) });
    }
  }

  private async handle(m: CompareViewToHostMessage): Promise<void> {
    switch (m.type) {
      case CompareViewToHostType.Ready:
        this.ready = true;
        if (this.found.length) this.sendTable();
        else await this.rescan();
        return;
      case CompareViewToHostType.Rescan:
        await this.rescan();
        return;
      case CompareViewToHostType.SetReference: {
        this.referenceId = m.rowId;
        const name = this.found.find((f) => f.entry.id === m.rowId)?.entry.name;
        if (name) void this.deps.memory?.update(REFERENCE_MEMORY_KEY, name);
        this.sendTable();
        return;
      }
      case CompareViewToHostType.SetAnnotationsAsRuns:
        this.annotationsAsRuns = m.value;
        await this.rescan();
        return;
      case CompareViewToHostType.RequestBands:
        await this.sendBands(m.requestId, m.rowIds.slice(0, COMPARE_MAX_OVERLAY));
        return;
      case CompareViewToHostType.OpenRun:
        await this.openRun(m.rowId, m.target);
        return;
      case CompareViewToHostType.ViewError:
        this.deps.log.warn(`compare view reported: ${m.message}`);
        return;
    }
  }

  private progress(found: number, done: number, text: string): void {
    this.post({ type: CompareHostToViewType.Progress, found, done, message: text });
  }

  /** Find the runs and read them all; the table is sent once, when every run is read or has failed. */
  private async rescan(): Promise<void> {
    this.scan?.cancel();
    const cts = new vscode.CancellationTokenSource();
    this.scan = cts;
    const runs = await readWorkspaceRuns(this.deps, cts.token, this.annotationsAsRuns, (found, done, text) =>
      this.progress(found, done, text),
    );
    if (!runs || cts.token.isCancellationRequested) return;
    const found = runs.found;
    this.found = found;
    if (this.referenceId && !found.some((f) => f.entry.id === this.referenceId)) this.referenceId = null;
    // The reference chosen before (also in an earlier session), found again by its name.
    if (!this.referenceId) {
      const remembered = this.deps.memory?.get<string>(REFERENCE_MEMORY_KEY);
      this.referenceId = (typeof remembered === 'string' && found.find((f) => f.entry.name === remembered)?.entry.id) || null;
    }
    if (runs.truncated)
      this.post({
        type: CompareHostToViewType.Notice,
        message: `Only the first ${runs.candidates} candidate files were looked at: the workspace has more.`,
      });
    this.sendTable();
  }

  private scheduleRebuild(): void {
    if (this.rebuildTimer) clearTimeout(this.rebuildTimer);
    this.rebuildTimer = setTimeout(() => {
      this.rebuildTimer = null;
      void this.refreshDataRuns();
    }, 400);
  }

  /** After a data run was re-read: take its new report and send the table again. */
  private async refreshDataRuns(): Promise<void> {
    for (const f of this.found) {
      if (f.entry.origin !== 'data' || !f.dataUri) continue;
      const run = this.deps.store.loaded(f.dataUri);
      if (run)
        f.entry = {
          ...f.entry,
          run: dataRunInput(f.entry.id, run.bs, run.report),
          error: null,
          canOverlay: true,
        };
    }
    this.sendTable();
  }

  private sendTable(): void {
    if (!this.ready) return;
    const table = buildCompareTable(
      this.found.map((f) => f.entry),
      this.referenceId,
      this.annotationsAsRuns,
    );
    this.lastRowCount = table.rows.length;
    this.post({ type: CompareHostToViewType.Table, table, environment: environmentFor(null) });
  }

  private async sendBands(requestId: number, rowIds: string[]): Promise<void> {
    const runs: CompareBandRun[] = [];
    const missing: { rowId: string; reason: string }[] = [];
    for (const rowId of rowIds) {
      const f = this.found.find((x) => x.entry.id === rowId);
      if (!f || !f.dataUri) {
        missing.push({ rowId, reason: f ? 'no data file to draw' : 'no such run (the list was refreshed)' });
        continue;
      }
      try {
        const run = await this.deps.store.get(f.dataUri);
        runs.push(bandRunOf(rowId, f.entry.name, run));
      } catch (e) {
        missing.push({ rowId, reason: message(e) });
      }
    }
    this.post({ type: CompareHostToViewType.Bands, requestId, runs, missing });
  }

  private async openRun(rowId: string, target: 'bandView' | 'file'): Promise<void> {
    const f = this.found.find((x) => x.entry.id === rowId);
    if (!f) return;
    if (target === 'bandView' && f.dataUri) {
      await vscode.commands.executeCommand(COMMANDS.openBandView, f.dataUri);
      return;
    }
    const doc = await vscode.workspace.openTextDocument(f.fileUri);
    await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.Beside, preview: true });
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    this.scan?.cancel();
    if (this.rebuildTimer) clearTimeout(this.rebuildTimer);
    for (const s of this.subs) s.dispose();
    if (CompareViewPanel.current === this) CompareViewPanel.current = null;
    this.panel.dispose();
  }

  static disposeCurrent(): void {
    CompareViewPanel.current?.dispose();
  }
}

/** The command that opens (or reveals) the compare view. */
export function registerCompareView(deps: CompareDeps): vscode.Disposable {
  return vscode.Disposable.from(
    vscode.commands.registerCommand(OPEN_COMPARE_VIEW_COMMAND, async () => {
      const p = await CompareViewPanel.show(deps);
      return p.lastRowCount;
    }),
    vscode.window.registerWebviewPanelSerializer(COMPARE_VIEW_TYPE, {
      deserializeWebviewPanel: async (panel: vscode.WebviewPanel) => {
        await CompareViewPanel.revive(panel, deps);
      },
    }),
    { dispose: () => CompareViewPanel.disposeCurrent() },
  );
}
