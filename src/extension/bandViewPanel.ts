/**
 * The band view panel, host side: creates the webview (strict CSP with a nonce, scripts only from
 * dist/webview), sends the band data, answers fit and window-scan requests with the core's engine, saves
 * annotations and exports plots. Every message from the view is validated against the protocol first.
 */
import * as vscode from 'vscode';
import {
  HostToViewType,
  ViewToHostType,
  base64ToBytes,
  isViewToHostMessage,
  type ExportFormat,
  type ExportMessage,
  type HostToViewMessage,
  type SaveMessage,
  type ViewToHostMessage,
} from '../protocol';
import type { RunStore } from './runStore';
import type { LoadedRun } from './runLoader';
import type { ExtensionSettings } from './settings';
import type { FitService } from './fitTypes';
import { targetProblem } from './fitTypes';
import { buildBandData } from './bandData';
import { withMeshPoints } from './meshPointsData';
import { bandViewHtml, makeNonce } from './bandViewHtml';
import { BAND_VIEW_TYPE } from './commandIds';
import { environmentFor, writeRefusal } from './trust';
import { saveAnnotations, type SaveOutcome } from './saveAnnotations';
import { readReviews } from './readReviews';
import { checkExportBytes } from './exportBytes';
import { kpointLinesOf } from './kpointLineCache';
import { CancelledError } from '../core/errors';
import { runTitle } from './runTitle';
import { readerById } from '../core/formats/index';

export interface PanelDeps {
  store: RunStore;
  extensionUri: vscode.Uri;
  log: vscode.LogOutputChannel;
  settings: () => ExtensionSettings;
  fits: FitService;
  toolVersion: string;
  onFocus: (uri: vscode.Uri | null) => void;
}

/** How long a command waits for the view to answer a save or export request. */
const VIEW_ANSWER_MS = 8000;

function fileName(uri: vscode.Uri): string {
  return runTitle(uri.path);
}

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

export class BandViewPanel implements vscode.Disposable {
  private readonly subs: vscode.Disposable[] = [];
  private postedRun: LoadedRun | null = null;
  private ready = false;
  private pendingSave: ((o: SaveOutcome) => void) | null = null;
  private pendingExport: { format: ExportFormat; target: vscode.Uri | null; done: (ok: boolean, m: string) => void } | null = null;
  private disposed = false;
  private readonly disposedEmitter = new vscode.EventEmitter<void>();
  readonly onDidDispose = this.disposedEmitter.event;

  constructor(
    readonly panel: vscode.WebviewPanel,
    readonly runUri: vscode.Uri,
    private readonly deps: PanelDeps,
  ) {
    this.subs.push(
      panel.webview.onDidReceiveMessage((m: unknown) => void this.receive(m)),
      panel.onDidDispose(() => this.dispose()),
      panel.onDidChangeViewState((e) => deps.onFocus(e.webviewPanel.active ? runUri : null)),
      deps.store.onDidChange((uri) => {
        if (uri.toString() === runUri.toString()) void this.sendState();
      }),
      vscode.window.onDidChangeActiveColorTheme(() => this.sendEnvironment()),
      vscode.workspace.onDidGrantWorkspaceTrust(() => this.sendEnvironment()),
    );
  }

  /** `column`: where to open (the column the other band views use, so runs share one column). */
  static async create(runUri: vscode.Uri, deps: PanelDeps, column: vscode.ViewColumn = vscode.ViewColumn.Beside): Promise<BandViewPanel> {
    const panel = vscode.window.createWebviewPanel(BAND_VIEW_TYPE, `Bands: ${fileName(runUri)}`, column, BandViewPanel.options(deps));
    return BandViewPanel.attach(panel, runUri, deps);
  }

  static options(deps: PanelDeps): vscode.WebviewPanelOptions & vscode.WebviewOptions {
    return {
      enableScripts: true,
      retainContextWhenHidden: true,
      localResourceRoots: [vscode.Uri.joinPath(deps.extensionUri, 'dist', 'webview')],
      enableFindWidget: false,
    };
  }

  /** Fill a panel (a new one, or one VS Code restores after a window reload) with the band view of a run. */
  static async attach(panel: vscode.WebviewPanel, runUri: vscode.Uri, deps: PanelDeps): Promise<BandViewPanel> {
    const root = vscode.Uri.joinPath(deps.extensionUri, 'dist', 'webview');
    panel.webview.options = BandViewPanel.options(deps);
    panel.title = `Bands: ${fileName(runUri)}`;
    const script = vscode.Uri.joinPath(root, 'bandView.js');
    try {
      await vscode.workspace.fs.stat(script);
    } catch {
      deps.log.error(`the band view script ${script.toString(true)} is missing: run the build (npm run build)`);
    }
    panel.webview.html = bandViewHtml({
      cspSource: panel.webview.cspSource,
      nonce: makeNonce(),
      scriptUri: panel.webview.asWebviewUri(script).toString(),
      title: `Bands: ${fileName(runUri)}`,
      runUri: runUri.toString(),
    });
    return new BandViewPanel(panel, runUri, deps);
  }

  reveal(): void {
    this.panel.reveal(undefined, false);
  }

  private post(m: HostToViewMessage): void {
    if (!this.disposed) void this.panel.webview.postMessage(m);
  }

  private sendEnvironment(): void {
    const run = this.deps.store.loaded(this.runUri);
    this.post({ type: HostToViewType.Environment, environment: environmentFor(run?.fileUri ?? this.runUri) });
  }

  /** Send what the store has for this run: data, a busy state or the failure sentence. */
  private async sendState(): Promise<void> {
    if (!this.ready) return;
    const state = this.deps.store.state(this.runUri);
    if (!state) {
      void this.deps.store.get(this.runUri).catch(() => undefined);
      return;
    }
    if (state.status === 'loading') {
      this.post({ type: HostToViewType.Loading, title: fileName(this.runUri) });
      // Whatever comes next (new data, or the old data after a cancelled re-read) is sent again.
      this.postedRun = null;
      return;
    }
    if (state.status === 'failed') {
      const why =
        state.error instanceof CancelledError
          ? 'Reading was cancelled. Run "Valleyscope: Reload Run" to read it again.'
          : message(state.error);
      this.post({ type: HostToViewType.LoadFailed, message: why });
      return;
    }
    const run = state.run;
    if (run === this.postedRun) return;
    this.postedRun = run;
    const s = this.deps.settings();
    // The header names the run's folder and file and the layout it was read as.
    const layout = readerById(run.bs.source.format)?.label ?? run.bs.source.format;
    const title = `${fileName(run.fileUri)} (${layout})`;
    const data = withMeshPoints(buildBandData(run.bs, run.report, run.geometry, title, s.analysis, s.energyReference), run);
    const environment = environmentFor(run.fileUri);
    this.post({ type: HostToViewType.BandData, data, environment });
    // Also as its own message, so controls that depend on it (save) update the same way as on a trust change.
    this.post({ type: HostToViewType.Environment, environment });
    await this.sendReviews(run);
  }

  /** The saved review statuses and notes of the annotations file beside the run. */
  private async sendReviews(run: LoadedRun): Promise<void> {
    const m = await readReviews(run);
    if (m.problem) this.deps.log.info(m.problem);
    this.post(m);
  }

  private async receive(raw: unknown): Promise<void> {
    if (!isViewToHostMessage(raw)) {
      const t = typeof raw === 'object' && raw !== null && 'type' in raw ? String(raw.type).slice(0, 40) : typeof raw;
      this.deps.log.warn(`band view: a message that does not follow the protocol was dropped (type ${t})`);
      return;
    }
    try {
      await this.handle(raw);
    } catch (e) {
      this.deps.log.error(`band view: ${raw.type}: ${message(e)}`);
    }
  }

  private async handle(m: ViewToHostMessage): Promise<void> {
    switch (m.type) {
      case ViewToHostType.Ready:
        this.ready = true;
        this.postedRun = null;
        await this.sendState();
        return;
      case ViewToHostType.RequestFit: {
        const run = this.deps.store.loaded(this.runUri);
        const problem = run ? targetProblem(run, m) : 'the run is not loaded';
        if (!run || problem) {
          this.post({ type: HostToViewType.RequestFailed, requestId: m.requestId, message: `Cannot fit: ${problem}.` });
          return;
        }
        try {
          const out = this.deps.fits.fit(run, m, m.window_meV, m.method, m.withScan === true);
          const target = {
            spin: m.spin,
            kIndex: m.kIndex,
            band0: m.band0,
            ...(typeof m.maximum === 'boolean' ? { maximum: m.maximum } : {}),
          };
          this.post({ type: HostToViewType.FitResult, requestId: m.requestId, target, ...out });
        } catch (e) {
          this.post({ type: HostToViewType.RequestFailed, requestId: m.requestId, message: message(e) });
        }
        return;
      }
      case ViewToHostType.RequestWindowScan: {
        const run = this.deps.store.loaded(this.runUri);
        const problem = run ? targetProblem(run, m) : 'the run is not loaded';
        if (!run || problem) {
          this.post({ type: HostToViewType.RequestFailed, requestId: m.requestId, message: `Cannot scan: ${problem}.` });
          return;
        }
        try {
          const scan = this.deps.fits.scan(run, m, m.method, m.windows_meV);
          this.post({
            type: HostToViewType.WindowScanResult,
            requestId: m.requestId,
            target: { spin: m.spin, kIndex: m.kIndex, band0: m.band0 },
            scan,
          });
        } catch (e) {
          this.post({ type: HostToViewType.RequestFailed, requestId: m.requestId, message: message(e) });
        }
        return;
      }
      case ViewToHostType.Save:
        await this.save(m);
        return;
      case ViewToHostType.Export:
        await this.export(m);
        return;
      case ViewToHostType.OpenFile:
        await this.openFile(m.kIndex);
        return;
      case ViewToHostType.ViewError:
        this.deps.log.warn(`band view reported: ${m.message}`);
        return;
    }
  }

  private async save(m: SaveMessage): Promise<void> {
    const run = this.deps.store.loaded(this.runUri);
    let outcome: SaveOutcome;
    if (!run) outcome = { ok: false, message: 'Nothing to save: the run is not loaded.' };
    else outcome = await saveAnnotations(run, m, this.deps);
    this.post({ type: HostToViewType.SaveResult, ok: outcome.ok, message: outcome.message });
    if (run && outcome.ok) await this.sendReviews(run);
    const p = this.pendingSave;
    this.pendingSave = null;
    if (p) p(outcome);
    else if (outcome.ok) void vscode.window.showInformationMessage(outcome.message);
    else void vscode.window.showWarningMessage(outcome.message);
  }

  /**
   * Save on behalf of the command: ask the view for its chosen fits; if it does not answer in time (not loaded
   * yet), save the analysis alone.
   */
  requestSave(): Promise<SaveOutcome> {
    return new Promise<SaveOutcome>((resolve) => {
      let settled = false;
      const done = (o: SaveOutcome): void => {
        if (settled) return;
        settled = true;
        clearTimeout(timer);
        resolve(o);
      };
      // `save` hands its outcome to `pendingSave`, whoever triggered it.
      const timer = setTimeout(() => {
        if (this.pendingSave !== done) return;
        this.deps.log.info('the band view did not answer the save request: saving the analysis without its fits');
        void this.save({ type: ViewToHostType.Save, entries: [] });
      }, VIEW_ANSWER_MS);
      this.pendingSave = done;
      if (this.ready) this.post({ type: HostToViewType.RequestSave });
      else void this.save({ type: ViewToHostType.Save, entries: [] });
    });
  }

  requestExport(format: ExportFormat, target: vscode.Uri | null): Promise<{ ok: boolean; message: string }> {
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        if (this.pendingExport?.done === done) {
          this.pendingExport = null;
          resolve({ ok: false, message: 'The band view did not send the plot (is it still loading?).' });
        }
      }, VIEW_ANSWER_MS);
      const done = (ok: boolean, message: string): void => {
        clearTimeout(timer);
        resolve({ ok, message });
      };
      this.pendingExport = { format, target, done };
      this.post({ type: HostToViewType.RequestExport, format });
    });
  }

  private async export(m: ExportMessage): Promise<void> {
    const pending = this.pendingExport;
    this.pendingExport = null;
    const run = this.deps.store.loaded(this.runUri);
    const base = run?.fileUri ?? this.runUri;
    const finish = (ok: boolean, text: string): void => {
      this.post({ type: HostToViewType.ExportResult, ok, message: text });
      if (pending) pending.done(ok, text);
      else if (ok) void vscode.window.showInformationMessage(text);
      else void vscode.window.showWarningMessage(text);
    };
    const refusal = writeRefusal(base);
    if (refusal) return finish(false, refusal.replace('write annotations', 'export plots'));
    let bytes: Uint8Array;
    try {
      bytes =
        m.format === 'svg'
          ? new TextEncoder().encode(m.data as string)
          : typeof m.data === 'string'
            ? base64ToBytes(m.data)
            : m.data instanceof ArrayBuffer
              ? new Uint8Array(m.data)
              : m.data;
      const bad = checkExportBytes(m.format, bytes);
      if (bad) return finish(false, bad);
    } catch (e) {
      return finish(false, `The plot could not be decoded: ${message(e)}`);
    }
    let target = pending?.target ?? null;
    if (!target) {
      const suggested = base.with({ path: `${base.path.replace(/\/+$/, '')}.bands.${m.format}` });
      target =
        (await vscode.window.showSaveDialog({
          defaultUri: suggested,
          filters: m.format === 'svg' ? { 'SVG image': ['svg'] } : { 'PNG image': ['png'] },
          title: 'Export band plot',
        })) ?? null;
      if (!target) return finish(false, 'Export cancelled.');
    }
    try {
      await vscode.workspace.fs.writeFile(target, bytes);
      const size = m.format === 'png' ? ` (${m.width} × ${m.height} pixels)` : '';
      finish(true, `Plot written to ${vscode.workspace.asRelativePath(target)}${size}.`);
    } catch (e) {
      finish(false, `The plot could not be written: ${message(e)}`);
    }
  }

  private async openFile(kIndex: number | undefined): Promise<void> {
    const run = this.deps.store.loaded(this.runUri);
    const uri = run?.fileUri ?? this.runUri;
    const doc = await vscode.workspace.openTextDocument(uri);
    let line = 0;
    if (run && kIndex !== undefined && kIndex < run.bs.nk) {
      const l = kpointLinesOf(doc, run)[kIndex] ?? -1;
      if (l >= 0) line = l;
    }
    const pos = new vscode.Position(line, 0);
    await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.One, selection: new vscode.Range(pos, pos) });
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    for (const s of this.subs) s.dispose();
    this.deps.onFocus(null);
    this.disposedEmitter.fire();
    this.disposedEmitter.dispose();
    this.panel.dispose();
  }
}
