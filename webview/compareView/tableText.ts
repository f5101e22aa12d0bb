/** Texts of the compare table's cells, headers and summary. Pure (no DOM). */
import type { CompareColumn, CompareRow } from '../../src/protocol';
import { fixed } from '../shared/format';

/** Key of the column of values the user types per run (also a trend axis). */
export const USER_KEY = 'user';

/** A number with its column's decimals, '—' when there is none. */
export function formatValue(v: number | null | undefined, decimals: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return fixed(v, decimals);
}

/** A column's header with its unit, as the trend plot's axes and the status line name it. */
export function columnTitle(columns: readonly CompareColumn[], key: string): string {
  const c = columns.find((x) => x.key === key);
  return c ? `${c.label}${c.unit ? ` (${c.unit})` : ''}` : key === USER_KEY ? 'Your value' : key;
}

/** The gap-type cell: unreadable, metal, semimetal, direct, indirect or '—', and whether the run has spinors. */
export function gapKindText(r: CompareRow): string {
  const kind = r.error
    ? 'unreadable'
    : r.metal
      ? r.semimetal
        ? 'semimetal'
        : 'metal'
      : r.direct === null
        ? '—'
        : r.direct
          ? 'direct'
          : 'indirect';
  return `${kind}${!r.error && r.spinors ? ' · spinors' : ''}`;
}

/** Tooltip of the gap-type cell, null when it has none. */
export function gapKindTitle(r: CompareRow): string | null {
  if (r.error) return r.error;
  return r.spinors ? 'Noncollinear (spin-orbit) run: one electron per band.' : null;
}

export interface CbmCell {
  text: string;
  title: string | null;
  /** The CBM sits in another valley than the reference's (same material). */
  moved: boolean;
}

/** The CBM cell against the reference row: valleys are compared only within one material. */
export function cbmCell(r: CompareRow, ref: CompareRow | undefined): CbmCell {
  const text = r.cbm ? `${r.cbm}${r.cbmValley ? ` [${r.cbmValley}]` : ''}` : '—';
  const sameMaterial = !ref || !ref.series || !r.series || ref.series === r.series;
  if (!sameMaterial)
    return {
      text,
      title: `Another material (${r.series}) than the reference (${ref.series}): its valleys are not matched with the reference's.`,
      moved: false,
    };
  if (ref && !r.isReference && ref.cbmValley && r.cbmValley && ref.cbmValley !== r.cbmValley)
    return {
      text,
      title: `The CBM is in valley ${r.cbmValley} here, in valley ${ref.cbmValley} in the reference: compare masses valley by valley.`,
      moved: true,
    };
  return { text, title: null, moved: false };
}

/** The header's one-line summary of the table. */
export function tableSummary(rows: readonly CompareRow[]): string {
  const n = rows.length;
  if (n === 0) return 'No runs found in the workspace.';
  const failed = rows.filter((r) => r.error !== null).length;
  const stale = rows.filter((r) => r.annotations === 'stale').length;
  return `${n} run${n === 1 ? '' : 's'}${failed ? `, ${failed} unreadable` : ''}${stale ? `, ${stale} with stale annotations` : ''}`;
}

/** A number typed in the "Your value" column: a true minus and a decimal comma accepted; null when empty. */
export function parseTypedValue(input: string): number | null | 'invalid' {
  const text = input.trim().replace('−', '-').replace(',', '.');
  if (text === '') return null;
  const x = Number(text);
  return Number.isFinite(x) ? x : 'invalid';
}
