/**
 * Loaded runs, one per URI: loads on demand (with a progress notification that can be cancelled for large
 * files), keeps the result or the error, and reloads when the file on disk changes or grows (a running
 * job). Features listen to `onDidChange` and redraw.
 */
import * as vscode from 'vscode';
import { CancelledError, ReaderError } from '../core/errors';
import { loadAndAnalyze, type LoadedRun } from './runLoader';
import type { ExtensionSettings } from './settings';

export type RunState = { status: 'loading' } | { status: 'loaded'; run: LoadedRun } | { status: 'failed'; error: unknown };

interface Entry {
  state: RunState;
  promise: Promise<LoadedRun>;
  cts: vscode.CancellationTokenSource;
  watcher: vscode.FileSystemWatcher | null;
  reloadTimer: ReturnType<typeof setTimeout> | null;
  /** When the first change not yet reloaded was seen (ms), or 0. */
  changedSince: number;
}

/** Files at least this large get a notification with a Cancel button; smaller ones a status-bar spinner. */
const NOTIFY_BYTES = 8 * 1024 * 1024;
/** Wait this long after the last change before reloading (a job writes in bursts). */
const RELOAD_DELAY_MS = 700;
/** ... but reload at least this often while a job keeps writing. */
const RELOAD_MAX_WAIT_MS = 5000;

export class RunStore implements vscode.Disposable {
  private readonly entries = new Map<string, Entry>();
  private readonly changed = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.changed.event;

  constructor(
    private readonly settings: () => ExtensionSettings,
    private readonly workerScript: string | null,
    private readonly log: vscode.LogOutputChannel,
  ) {}

  state(uri: vscode.Uri): RunState | undefined {
    return this.entries.get(uri.toString())?.state;
  }

  loaded(uri: vscode.Uri): LoadedRun | undefined {
    const s = this.state(uri);
    return s?.status === 'loaded' ? s.run : undefined;
  }

  /** The run for this URI, loading it when needed. Rejects with the reader's error when it cannot be read. */
  get(uri: vscode.Uri): Promise<LoadedRun> {
    const e = this.entries.get(uri.toString());
    if (e) return e.promise;
    return this.load(uri);
  }

  /** Read again (settings changed, the file changed, or the user asked). */
  reload(uri: vscode.Uri): Promise<LoadedRun> {
    return this.load(uri);
  }

  /** Reload every loaded run (after a settings change). */
  reloadAll(): void {
    for (const key of [...this.entries.keys()]) void this.load(vscode.Uri.parse(key)).catch(() => undefined);
  }

  forget(uri: vscode.Uri): void {
    const key = uri.toString();
    const e = this.entries.get(key);
    if (!e) return;
    e.cts.cancel();
    e.watcher?.dispose();
    if (e.reloadTimer) clearTimeout(e.reloadTimer);
    this.entries.delete(key);
  }

  /** `quiet`: a reload the user did not ask for (the file changed): progress in the status bar, not a notification. */
  private load(uri: vscode.Uri, quiet = false): Promise<LoadedRun> {
    const key = uri.toString();
    const old = this.entries.get(key);
    const previous = old?.state.status === 'loaded' ? old.state.run : null;
    old?.cts.cancel();
    if (old?.reloadTimer) clearTimeout(old.reloadTimer);
    const cts = new vscode.CancellationTokenSource();
    const entry: Entry = {
      state: { status: 'loading' },
      promise: Promise.resolve(null as unknown as LoadedRun),
      cts,
      watcher: old?.watcher ?? null,
      reloadTimer: null,
      changedSince: 0,
    };
    entry.promise = this.run(uri, cts, quiet).then(
      (run) => {
        if (this.entries.get(key) === entry) {
          entry.state = { status: 'loaded', run };
          this.watch(entry, run.fileUri, uri);
          this.changed.fire(uri);
        }
        return run;
      },
      (error: unknown) => {
        if (this.entries.get(key) === entry && error instanceof CancelledError && previous) {
          // A cancelled re-read keeps what was read before.
          entry.state = { status: 'loaded', run: previous };
          entry.promise = Promise.resolve(previous);
          this.changed.fire(uri);
          throw error;
        }
        if (this.entries.get(key) === entry) {
          entry.state = { status: 'failed', error };
          // Watch the file that failed too: a job still writing it, or a fix, brings a reload.
          const failedFile = error instanceof ReaderError && error.file ? uri.with({ path: error.file }) : uri;
          this.watch(entry, failedFile, uri);
          this.changed.fire(uri);
        }
        throw error;
      },
    );
    // A failure is kept in `state`; callers that do not await must not see an unhandled rejection.
    entry.promise.catch(() => undefined);
    this.entries.set(key, entry);
    this.changed.fire(uri);
    return entry.promise;
  }

  private async run(uri: vscode.Uri, cts: vscode.CancellationTokenSource, quiet: boolean): Promise<LoadedRun> {
    const s = this.settings();
    let size = 0;
    try {
      const st = await vscode.workspace.fs.stat(uri);
      size = st.type & vscode.FileType.Directory ? 0 : st.size;
    } catch {
      size = 0;
    }
    const name = uri.path.split('/').pop() ?? uri.path;
    const opts = {
      settings: s.analysis,
      maxBytes: s.maxBytes,
      workerScript: this.workerScript,
      workerThresholdBytes: s.workerThresholdBytes,
    };
    const started = Date.now();
    this.log.info(
      `${uri.toString(true)}: reading (${(size / 1e6).toFixed(1)} MB${this.workerScript && size >= s.workerThresholdBytes ? ', on a worker thread' : ''})`,
    );
    const task = async (
      progress: vscode.Progress<{ message?: string; increment?: number }>,
      token: vscode.CancellationToken,
    ): Promise<LoadedRun> => {
      const sub = token.onCancellationRequested(() => cts.cancel());
      let reported = 0;
      try {
        return await loadAndAnalyze(uri, opts, cts.token, (fraction, message) => {
          const pct = Math.round(fraction * 100);
          progress.report({ message: `${name}: ${message}`, increment: Math.max(0, pct - reported) });
          reported = Math.max(reported, pct);
        });
      } finally {
        sub.dispose();
      }
    };
    try {
      const run =
        size >= NOTIFY_BYTES && !quiet
          ? await vscode.window.withProgress(
              { location: vscode.ProgressLocation.Notification, title: `Valleyscope: reading ${name}`, cancellable: true },
              task,
            )
          : await vscode.window.withProgress({ location: vscode.ProgressLocation.Window, title: 'Valleyscope' }, (p) => task(p, cts.token));
      this.log.info(
        `${uri.toString(true)}: read and analysed in ${Date.now() - started} ms (${run.bs.nk} k-points, ${run.bs.nBands} bands)`,
      );
      return run;
    } catch (e) {
      if (e instanceof CancelledError) this.log.info(`${uri.toString(true)}: reading cancelled`);
      else this.log.warn(`${uri.toString(true)}: ${e instanceof Error ? e.message : String(e)}`);
      throw e;
    }
  }

  /** Reload when the eigenvalue file changes on disk (a running job appends to it). */
  private watch(entry: Entry, fileUri: vscode.Uri, runUri: vscode.Uri): void {
    if (entry.watcher) return;
    const dir = vscode.Uri.joinPath(fileUri, '..');
    const base = fileUri.path.split('/').pop() ?? '';
    try {
      const w = vscode.workspace.createFileSystemWatcher(new vscode.RelativePattern(dir, base), false, false, true);
      const changed = (): void => {
        const e = this.entries.get(runUri.toString());
        if (!e) return;
        if (e.reloadTimer) clearTimeout(e.reloadTimer);
        const now = Date.now();
        if (!e.changedSince) e.changedSince = now;
        const wait = Math.max(0, Math.min(RELOAD_DELAY_MS, e.changedSince + RELOAD_MAX_WAIT_MS - now));
        e.reloadTimer = setTimeout(() => {
          e.reloadTimer = null;
          e.changedSince = 0;
          this.log.info(`${fileUri.toString(true)} changed on disk: reading it again`);
          void this.load(runUri, true).catch(() => undefined);
        }, wait);
      };
      // A job rewrites the file in place, or writes it anew.
      w.onDidChange(changed);
      w.onDidCreate(changed);
      entry.watcher = w;
    } catch {
      // Some virtual file systems cannot be watched: the user reloads by hand.
    }
  }

  dispose(): void {
    for (const key of [...this.entries.keys()]) this.forget(vscode.Uri.parse(key));
    this.changed.dispose();
  }
}
