/**
 * Problems-panel entries from a failed read (ReaderError: line and column) or from the warnings of a
 * successful one. Pure: 0-based positions and a severity; diagnostics.ts makes vscode.Diagnostics of them.
 */
import type { BandStructure, Report } from '../core/model';
import { ReaderError } from '../core/errors';

export interface DiagnosticItem {
  /** 0-based line and column. */
  line: number;
  column: number;
  /** Whole line when true; otherwise from column to the end of the token. */
  wholeLine: boolean;
  severity: 'error' | 'warning' | 'information';
  message: string;
  code: string;
}

export function itemsFromError(e: unknown): DiagnosticItem[] {
  if (e instanceof ReaderError) {
    return [
      {
        line: Math.max(0, e.line - 1),
        column: Math.max(0, e.column - 1),
        wholeLine: e.column <= 0,
        severity: 'error',
        message: e.reason,
        code: e.format || 'reader',
      },
    ];
  }
  const message = e instanceof Error ? e.message : String(e);
  return [{ line: 0, column: 0, wholeLine: true, severity: 'error', message, code: 'load' }];
}

/**
 * Warnings of the read (with their line when the reader gave one) and of the analysis (on the first line).
 * `fileName` filters reader warnings that belong to companion files (they are not positions in this text).
 */
export function itemsFromRun(bs: BandStructure, report: Report, mainPath: string, lastLine: number): DiagnosticItem[] {
  const out: DiagnosticItem[] = [];
  const readerMessages = new Set<string>();
  for (const w of bs.warnings) {
    readerMessages.add(w.message);
    const here = !w.file || w.file === mainPath;
    out.push({
      line: here && w.line ? Math.max(0, w.line - 1) : 0,
      column: 0,
      wholeLine: true,
      severity: 'warning',
      message: here ? w.message : `${w.file}: ${w.message}`,
      code: w.code,
    });
  }
  for (const m of report.warnings) {
    if (readerMessages.has(m)) continue;
    out.push({ line: 0, column: 0, wholeLine: true, severity: 'warning', message: m, code: 'analysis' });
  }
  if (bs.partial) {
    out.push({
      line: lastLine,
      column: 0,
      wholeLine: true,
      severity: 'information',
      message: `The file ends early (a running job?): only the first ${bs.nk} k-points are complete. Results are provisional and refresh when the file grows.`,
      code: 'partial',
    });
  }
  return out;
}
