/**
 * Activation: wires the run store, language features, status bar, band view and commands. Every feature
 * lives in its own file; all physics comes from src/core.
 */
import * as vscode from 'vscode';
import { RunStore } from './runStore';
import { readSettings } from './settings';
import { LANGUAGE_IDS, isEigenvalueLanguage } from './languageIds';
import { registerContentDetection } from './languages';
import { registerAnnotationsDiagnostics, registerDiagnostics } from './diagnostics';
import { EigenvalueSymbolProvider } from './documentSymbols';
import { KpointHoverProvider } from './hover';
import { AnnotationsCodeLensProvider, GapCodeLensProvider } from './codeLens';
import { GapStatusItem } from './statusBar';
import { BandViewPanels } from './bandViewPanels';
import { registerCommands } from './commands';
import { SummaryDocuments } from './summaryDocuments';
import { registerBandViewRestore } from './bandViewRestore';
import { makeFitService } from './fitService';
import { registerCompareView } from './compareViewPanel';

export function activate(context: vscode.ExtensionContext): void {
  const log = vscode.window.createOutputChannel('Valleyscope', { log: true });
  const settings = () => readSettings((key) => vscode.workspace.getConfiguration('valleyscope').get(key));
  // Worker threads exist in desktop and remote extension hosts (extension files on a local disk); the web
  // build replaces node:worker_threads and runs jobs in-process.
  const workerScript =
    process.env.VALLEYSCOPE_WEB !== '1' && context.extensionUri.scheme === 'file'
      ? vscode.Uri.joinPath(context.extensionUri, 'dist', 'analysisWorker.js').fsPath
      : null;
  const store = new RunStore(settings, workerScript, log);
  const status = new GapStatusItem(store);
  const fits = makeFitService(() => settings().analysis);
  const written = (context.extension.packageJSON as { version?: unknown }).version;
  const toolVersion = typeof written === 'string' ? written : '0.0.0';
  const panels = new BandViewPanels({
    store,
    extensionUri: context.extensionUri,
    log,
    settings,
    fits,
    toolVersion,
    onFocus: (u) => status.setPanelRun(u),
  });
  const selector: vscode.DocumentSelector = LANGUAGE_IDS.map((language) => ({ language }));
  const lenses = new GapCodeLensProvider(store);

  const loadIfOurs = (doc: vscode.TextDocument): void => {
    if (isEigenvalueLanguage(doc.languageId) && !doc.isUntitled) void store.get(doc.uri).catch(() => undefined);
  };
  vscode.workspace.textDocuments.forEach(loadIfOurs);

  context.subscriptions.push(
    log,
    store,
    status,
    lenses,
    { dispose: () => panels.dispose() },
    registerContentDetection(),
    registerDiagnostics(store),
    registerAnnotationsDiagnostics(),
    vscode.languages.registerDocumentSymbolProvider(selector, new EigenvalueSymbolProvider(store), { label: 'k-path' }),
    vscode.languages.registerHoverProvider(selector, new KpointHoverProvider(store)),
    vscode.languages.registerCodeLensProvider(selector, lenses),
    vscode.languages.registerCodeLensProvider({ pattern: '**/*.valleys.json' }, new AnnotationsCodeLensProvider()),
    new SummaryDocuments(store),
    registerBandViewRestore(panels, store, log),
    registerCommands(store, panels, { settings: () => settings(), fits, toolVersion, log }),
    registerCompareView({ store, extensionUri: context.extensionUri, log, settings, memory: context.workspaceState }),
    vscode.workspace.onDidOpenTextDocument(loadIfOurs),
    vscode.workspace.onDidCloseTextDocument((doc) => {
      // Free the memory of a run nobody looks at any more.
      if (isEigenvalueLanguage(doc.languageId) && !panels.isOpen(doc.uri)) store.forget(doc.uri);
    }),
    vscode.workspace.onDidChangeConfiguration((e) => {
      if (e.affectsConfiguration('valleyscope')) store.reloadAll();
    }),
  );
}

export function deactivate(): void {
  // Disposables registered in activate are released by VS Code.
}
