/** The k-point line map of an open document, computed once per document version and run. */
import type * as vscode from 'vscode';
import type { LoadedRun } from './runLoader';
import { locateKpointLines } from './kpointLines';

const cache = new WeakMap<vscode.TextDocument, { version: number; run: LoadedRun; lines: Int32Array }>();

export function kpointLinesOf(doc: vscode.TextDocument, run: LoadedRun): Int32Array {
  const c = cache.get(doc);
  if (c && c.version === doc.version && c.run === run) return c.lines;
  const lines = locateKpointLines(doc.getText(), run.bs.kpoints, run.bs.nk, run.geometry.cartesian);
  cache.set(doc, { version: doc.version, run, lines });
  return lines;
}
