/** Hover on a k-point line: where it is, band energies near the edges, and whether it hosts an edge. */
import * as vscode from 'vscode';
import type { RunStore } from './runStore';
import { hoverLines } from './hoverText';
import { kpointAtLine } from './kpointLines';
import { kpointLinesOf } from './kpointLineCache';

export class KpointHoverProvider implements vscode.HoverProvider {
  constructor(private readonly store: RunStore) {}

  provideHover(doc: vscode.TextDocument, pos: vscode.Position): vscode.Hover | undefined {
    // Hovers answer from a run already loaded (opening the document starts the load); never block on a read.
    const run = this.store.loaded(doc.uri);
    if (!run) return undefined;
    const k = kpointAtLine(kpointLinesOf(doc, run), pos.line);
    if (k < 0) return undefined;
    const md = new vscode.MarkdownString(hoverLines(run.bs, run.report, run.geometry, k).join('  \n'));
    md.isTrusted = false;
    md.supportHtml = false;
    return new vscode.Hover(md, doc.lineAt(pos.line).range);
  }
}
