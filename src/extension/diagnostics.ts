/** Problems-panel entries for eigenvalue files: reader errors (with line and column) and warnings. */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { itemsFromError, itemsFromRun, type DiagnosticItem } from './diagnosticItems';
import { CancelledError, ReaderError } from '../core/errors';
import { isAnnotationsPath } from '../core/annotations/annotationsModel';
import { annotationsProblems } from './annotationsCheck';

const SEVERITY = {
  error: vscode.DiagnosticSeverity.Error,
  warning: vscode.DiagnosticSeverity.Warning,
  information: vscode.DiagnosticSeverity.Information,
} as const;

export function toDiagnostic(doc: vscode.TextDocument | undefined, item: DiagnosticItem): vscode.Diagnostic {
  let range: vscode.Range;
  if (doc && item.line < doc.lineCount) {
    const text = doc.lineAt(item.line);
    if (item.wholeLine) range = text.range;
    else {
      const word = doc.getWordRangeAtPosition(new vscode.Position(item.line, item.column), /[^\s]+/);
      range = word ?? new vscode.Range(item.line, item.column, item.line, text.range.end.character);
    }
  } else range = new vscode.Range(item.line, item.column, item.line, item.column + 1);
  const d = new vscode.Diagnostic(range, item.message, SEVERITY[item.severity]);
  d.source = 'Valleyscope';
  d.code = item.code;
  return d;
}

export function registerDiagnostics(store: RunStore): vscode.Disposable {
  const collection = vscode.languages.createDiagnosticCollection('valleyscope');
  const update = (uri: vscode.Uri): void => {
    const state = store.state(uri);
    const doc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
    if (!state || state.status === 'loading') return;
    if (state.status === 'failed') {
      if (state.error instanceof CancelledError) collection.delete(uri);
      else {
        // A reader error names the file it is about (the file inside a folder that was opened).
        const target = state.error instanceof ReaderError && state.error.file ? uri.with({ path: state.error.file }) : uri;
        const targetDoc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === target.toString());
        collection.set(
          target,
          itemsFromError(state.error).map((i) => toDiagnostic(targetDoc, i)),
        );
      }
      return;
    }
    const run = state.run;
    // A folder was opened: the messages belong to the eigenvalue file inside it.
    const target = run.fileUri;
    const targetDoc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === target.toString()) ?? doc;
    const lastLine = targetDoc ? targetDoc.lineCount - 1 : 0;
    collection.set(
      target,
      itemsFromRun(run.bs, run.report, run.bs.source.file, lastLine).map((i) => toDiagnostic(targetDoc, i)),
    );
  };
  return vscode.Disposable.from(collection, store.onDidChange(update));
}

/** Problems of `*.valleys.json` documents, checked as they are opened and edited. */
export function registerAnnotationsDiagnostics(): vscode.Disposable {
  const collection = vscode.languages.createDiagnosticCollection('valleyscope-annotations');
  const timers = new Map<string, ReturnType<typeof setTimeout>>();
  const check = (doc: vscode.TextDocument): void => {
    if (!isAnnotationsPath(doc.uri.path)) return;
    const key = doc.uri.toString();
    const t = timers.get(key);
    if (t) clearTimeout(t);
    timers.set(
      key,
      setTimeout(() => {
        timers.delete(key);
        const name = doc.uri.path.split('/').pop() ?? doc.uri.path;
        collection.set(
          doc.uri,
          annotationsProblems(doc.getText(), name).map((i) => toDiagnostic(doc, i)),
        );
      }, 300),
    );
  };
  vscode.workspace.textDocuments.forEach(check);
  return vscode.Disposable.from(
    collection,
    vscode.workspace.onDidOpenTextDocument(check),
    vscode.workspace.onDidChangeTextDocument((e) => check(e.document)),
    vscode.workspace.onDidCloseTextDocument((d) => collection.delete(d.uri)),
    { dispose: () => timers.forEach((t) => clearTimeout(t)) },
  );
}
