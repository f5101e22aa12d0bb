/**
 * What the compare view keeps across reloads of its webview (VS Code's getState/setState): typed values by
 * run name (row ids change between tables, names do not), trend axes, sort, "More columns". Also how the
 * ticked runs and typed values follow their runs into a new table. Pure (no DOM).
 */
import type { CompareRow } from '../../src/protocol';
import type { SortState } from './tableSort';

export interface SavedState {
  user: Record<string, number>;
  trendX: string;
  trendY: string;
  sort: SortState | null;
  more: boolean;
}

/** The view's settings before any state is read. */
export const DEFAULT_STATE: SavedState = { user: {}, trendX: 'volumeStrain', trendY: 'gap', sort: null, more: false };

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** Reads a saved state, keeping the defaults for whatever is missing or malformed. */
export function readSavedState(raw: unknown): SavedState {
  const s: SavedState = { ...DEFAULT_STATE, user: {} };
  if (!isRecord(raw)) return s;
  if (isRecord(raw.user))
    for (const [name, v] of Object.entries(raw.user)) if (typeof v === 'number' && Number.isFinite(v)) s.user[name] = v;
  if (typeof raw.trendX === 'string') s.trendX = raw.trendX;
  if (typeof raw.trendY === 'string') s.trendY = raw.trendY;
  const sort = raw.sort;
  if (isRecord(sort) && typeof sort.key === 'string' && (sort.direction === 'ascending' || sort.direction === 'descending'))
    s.sort = { key: sort.key, direction: sort.direction };
  if (raw.more === true) s.more = true;
  return s;
}

/**
 * Typed values by run name: those saved earlier (runs not in the table keep theirs) updated with the
 * values typed for the rows of the current table (a row without a value drops its name's).
 */
export function userValuesByName(
  saved: Readonly<Record<string, number>>,
  rows: readonly CompareRow[],
  userValues: ReadonlyMap<string, number>,
): Record<string, number> {
  const user: Record<string, number> = { ...saved };
  for (const r of rows) {
    const v = userValues.get(r.id);
    if (v !== undefined) user[r.name] = v;
    else delete user[r.name];
  }
  return user;
}

export interface CarriedRows {
  /** Ticked rows of the new table (ids), in the new table's order; only rows that can be drawn. */
  selected: string[];
  /** Typed values by row id of the new table. */
  userValues: Map<string, number>;
}

/** Ticks and typed values follow their runs (by name) from the previous table into the next. */
export function carryRows(
  previous: readonly CompareRow[],
  next: readonly CompareRow[],
  selected: readonly string[],
  userValues: ReadonlyMap<string, number>,
  savedByName: Readonly<Record<string, number>>,
): CarriedRows {
  const previousNames = new Map(previous.map((r) => [r.id, r.name]));
  const selectedNames = new Set(selected.map((id) => previousNames.get(id)).filter((n): n is string => n !== undefined));
  const userByName = new Map<string, number>(Object.entries(savedByName));
  for (const [id, v] of userValues) {
    const n = previousNames.get(id);
    if (n !== undefined) userByName.set(n, v);
  }
  const carried = new Map<string, number>();
  for (const r of next) {
    const v = userByName.get(r.name);
    if (v !== undefined) carried.set(r.id, v);
  }
  return { selected: next.filter((r) => selectedNames.has(r.name) && r.canOverlay).map((r) => r.id), userValues: carried };
}
