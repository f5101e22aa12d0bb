/** Outline of an eigenvalue file: k-points grouped by path segment, labelled points named. */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { buildSymbolTree, type SymbolNode } from './symbolTree';
import { kpointLinesOf } from './kpointLineCache';

function toSymbol(doc: vscode.TextDocument, n: SymbolNode): vscode.DocumentSymbol {
  const last = doc.lineCount - 1;
  const start = Math.min(n.startLine, last);
  const end = Math.min(Math.max(n.endLine, start), last);
  const range = new vscode.Range(start, 0, end, doc.lineAt(end).range.end.character);
  const sel = Math.min(Math.max(n.selectionLine, start), end);
  const selection = doc.lineAt(sel).range;
  const kind = n.kind === 'kpoint' ? vscode.SymbolKind.Constant : vscode.SymbolKind.Namespace;
  const s = new vscode.DocumentSymbol(
    n.name,
    n.detail,
    kind,
    range,
    range.contains(selection) ? selection : new vscode.Range(start, 0, start, 0),
  );
  s.children = n.children.map((c) => toSymbol(doc, c));
  return s;
}

export class EigenvalueSymbolProvider implements vscode.DocumentSymbolProvider {
  constructor(private readonly store: RunStore) {}

  async provideDocumentSymbols(doc: vscode.TextDocument): Promise<vscode.DocumentSymbol[]> {
    let run;
    try {
      run = await this.store.get(doc.uri);
    } catch {
      return [];
    }
    const lines = kpointLinesOf(doc, run);
    return buildSymbolTree(run.bs, run.geometry, lines, doc.lineCount - 1).map((n) => toSymbol(doc, n));
  }
}
