/**
 * The outline of an eigenvalue file: k-points grouped by path segment ("Γ → X"), labelled points named by
 * their label. Pure: returns plain nodes with 0-based line ranges; documentSymbols.ts turns them into
 * vscode.DocumentSymbol.
 */
import type { BandStructure } from '../core/model';
import type { PathGeometry } from '../core/lattice/kpath';

export interface SymbolNode {
  name: string;
  detail: string;
  kind: 'segment' | 'kpoint' | 'grid';
  /** 0-based, inclusive. */
  startLine: number;
  endLine: number;
  /** Line to select (the k-point line). */
  selectionLine: number;
  children: SymbolNode[];
}

/** Above this many k-points only labelled points are listed as children (the outline stays usable). */
export const MAX_KPOINT_SYMBOLS = 5000;

function fmtK(bs: BandStructure, k: number): string {
  const c = [bs.kpoints[3 * k]!, bs.kpoints[3 * k + 1]!, bs.kpoints[3 * k + 2]!];
  return `(${c.map((x) => (Math.abs(x) < 5e-7 ? 0 : x).toFixed(4)).join(', ')})`;
}

function pointName(k: number, label: string | undefined): string {
  return label ? `${label} (k ${k + 1})` : `k ${k + 1}`;
}

/**
 * Nodes for the outline. `kLines[k]` is the line of k-point k (-1 when not found); `lastLine` is the last
 * line of the document.
 */
export function buildSymbolTree(bs: BandStructure, geometry: PathGeometry, kLines: Int32Array, lastLine: number): SymbolNode[] {
  const labelOf = new Map(bs.labels.map((l) => [l.index, l.label]));
  const lineOf = (k: number): number => (k >= 0 && k < kLines.length ? kLines[k]! : -1);
  /** Last line of the block that starts at k-point k. */
  const blockEnd = (k: number): number => {
    for (let j = k + 1; j < bs.nk; j++) {
      const l = lineOf(j);
      if (l > lineOf(k)) return l - 1;
      if (l < 0) break;
    }
    return lastLine;
  };
  const listAll = bs.nk <= MAX_KPOINT_SYMBOLS;
  const child = (k: number): SymbolNode | null => {
    const l = lineOf(k);
    if (l < 0) return null;
    const label = labelOf.get(k);
    if (!listAll && label === undefined) return null;
    return {
      name: pointName(k, label),
      detail: fmtK(bs, k),
      kind: 'kpoint',
      startLine: l,
      endLine: Math.max(l, blockEnd(k)),
      selectionLine: l,
      children: [],
    };
  };

  if (bs.sampling === 'grid' || geometry.segments.length === 0) {
    const first = lineOf(0);
    if (first < 0) return [];
    const children: SymbolNode[] = [];
    for (let k = 0; k < bs.nk; k++) {
      const c = child(k);
      if (c) children.push(c);
    }
    return [
      {
        name: `${bs.nk} k-points`,
        detail: bs.sampling === 'grid' ? 'uniform grid' : '',
        kind: 'grid',
        startLine: first,
        endLine: lastLine,
        selectionLine: first,
        children,
      },
    ];
  }

  const out: SymbolNode[] = [];
  for (const seg of geometry.segments) {
    const first = lineOf(seg.start);
    if (first < 0) continue;
    const from = seg.startLabel ?? `k ${seg.start + 1}`;
    const to = seg.endLabel ?? `k ${seg.end + 1}`;
    const endLine = Math.max(first, blockEnd(seg.end));
    const children: SymbolNode[] = [];
    for (let k = seg.start; k <= seg.end; k++) {
      const c = child(k);
      if (c) {
        c.endLine = Math.min(c.endLine, endLine);
        children.push(c);
      }
    }
    out.push({
      name: `${from} → ${to}`,
      detail: `${seg.end - seg.start + 1} k-points${seg.afterJump ? ', after a jump' : ''}`,
      kind: 'segment',
      startLine: first,
      endLine,
      selectionLine: first,
      children,
    });
  }
  return out;
}
