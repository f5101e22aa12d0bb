/** Sorting the compare table's rows by a column. Pure (no DOM). */
import type { CompareRow } from '../../src/protocol';

export type SortDirection = 'ascending' | 'descending';

export interface SortState {
  /** A numeric column key, or one of the text columns: 'name', 'type', 'vbm', 'cbm', 'annotations'. */
  key: string;
  direction: SortDirection;
}

export const TEXT_SORT_KEYS = ['name', 'type', 'vbm', 'cbm', 'annotations', 'user'] as const;

function textOf(row: CompareRow, key: string): string {
  switch (key) {
    case 'name':
      return row.name;
    case 'type':
      return row.metal ? 'metal' : row.direct === null ? '' : row.direct ? 'direct' : 'indirect';
    case 'vbm':
      return row.vbm ?? '';
    case 'cbm':
      return row.cbm ?? '';
    case 'annotations':
      return row.annotations;
    default:
      return '';
  }
}

/**
 * Rows in the order of the column. Numbers compare as numbers, rows without a number go last whatever the
 * direction, ties keep the table's order (by name) so a sort is reproducible.
 */
export function sortRows(
  rows: readonly CompareRow[],
  sort: SortState | null,
  userValues: ReadonlyMap<string, number> = new Map(),
): CompareRow[] {
  const byName = [...rows].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  if (!sort) return byName;
  const sign = sort.direction === 'ascending' ? 1 : -1;
  const numeric = !(TEXT_SORT_KEYS as readonly string[]).includes(sort.key) || sort.key === 'user';
  const value = (r: CompareRow): number | null => {
    const v = sort.key === 'user' ? userValues.get(r.id) : r.values[sort.key];
    return typeof v === 'number' && Number.isFinite(v) ? v : null;
  };
  const order = new Map(byName.map((r, i) => [r.id, i]));
  return byName.sort((a, b) => {
    if (numeric) {
      const va = value(a);
      const vb = value(b);
      if (va === null && vb === null) return order.get(a.id)! - order.get(b.id)!;
      if (va === null) return 1;
      if (vb === null) return -1;
      if (va !== vb) return sign * (va - vb);
    } else {
      const ta = textOf(a, sort.key);
      const tb = textOf(b, sort.key);
      if (ta !== tb) return sign * ta.localeCompare(tb);
    }
    return order.get(a.id)! - order.get(b.id)!;
  });
}

/** The next sort after a click on a header: ascending, then descending, then back to ascending. */
export function nextSort(current: SortState | null, key: string): SortState {
  if (current && current.key === key) return { key, direction: current.direction === 'ascending' ? 'descending' : 'ascending' };
  return { key, direction: 'ascending' };
}

/** The sort kept after a new table: dropped when its column is gone (text columns and typed values stay). */
export function keepSort(sort: SortState | null, columnKeys: readonly string[]): SortState | null {
  if (!sort) return null;
  if ((TEXT_SORT_KEYS as readonly string[]).includes(sort.key) || columnKeys.includes(sort.key)) return sort;
  return null;
}
