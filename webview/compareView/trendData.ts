/**
 * The trend plot's data: one point per readable run with a value on both axes, lines joining only runs of
 * one material (series), the axis choices and the texts around the plot. Pure (no DOM).
 */
import type { CompareColumn, CompareRow, CompareTable } from '../../src/protocol';
import { columnTitle, USER_KEY } from './tableText';

export interface TrendPoint {
  row: CompareRow;
  x: number;
  y: number;
}

export interface TrendSeries {
  name: string;
  rowIds: string[];
}

/** Line colours of the trend plot's series (material and lattice type), in order of first appearance. */
export const TREND_SERIES_COLOURS = [
  'var(--vscode-charts-blue, #3794ff)',
  'var(--vscode-charts-purple, #b180d7)',
  'var(--vscode-charts-green, #89d185)',
  'var(--vscode-charts-yellow, #cca700)',
  'var(--vscode-charts-red, #f14c4c)',
];
/** Colour of runs without a structure (no series). */
export const NO_SERIES_COLOUR = 'var(--vscode-descriptionForeground)';

/** A row's value of a column or of the typed values; null when missing or not finite. */
export function valueOf(r: CompareRow, key: string, userValues: ReadonlyMap<string, number>): number | null {
  const v = key === USER_KEY ? userValues.get(r.id) : r.values[key];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

/** Readable runs with both values, by increasing x. */
export function trendPoints(
  rows: readonly CompareRow[],
  xKey: string,
  yKey: string,
  userValues: ReadonlyMap<string, number>,
): TrendPoint[] {
  return rows
    .filter((r) => r.error === null)
    .map((r) => ({ row: r, x: valueOf(r, xKey, userValues), y: valueOf(r, yKey, userValues) }))
    .filter((p): p is TrendPoint => p.x !== null && p.y !== null)
    .sort((a, b) => a.x - b.x);
}

/** One series per material among the points, in order of first appearance; runs without a structure join none. */
export function trendSeries(points: readonly TrendPoint[]): TrendSeries[] {
  const names = [...new Set(points.map((p) => p.row.series ?? null).filter((n): n is string => n !== null))];
  return names.map((name) => ({ name, rowIds: points.filter((p) => p.row.series === name).map((p) => p.row.id) }));
}

/** Colour of a series (by its place in the list), the muted colour for no series. */
export function seriesColour(series: readonly TrendSeries[], name: string | null): string {
  if (name === null) return NO_SERIES_COLOUR;
  return TREND_SERIES_COLOURS[series.findIndex((s) => s.name === name) % TREND_SERIES_COLOURS.length]!;
}

/** An axis domain with 6 % room on each side; a single value gets ±5 % of itself (at least 1e-3). */
export function paddedDomain(lo: number, hi: number): [number, number] {
  return hi > lo
    ? [lo - 0.06 * (hi - lo), hi + 0.06 * (hi - lo)]
    : [lo - Math.max(1e-3, Math.abs(lo) * 0.05), hi + Math.max(1e-3, Math.abs(hi) * 0.05)];
}

/** Legend line of a series: material, its lattice types, number of runs. */
export function seriesLegendText(points: readonly TrendPoint[], s: TrendSeries): string {
  const types = [
    ...new Set(
      points
        .filter((p) => p.row.series === s.name)
        .map((p) => p.row.latticeType)
        .filter((x): x is string => !!x),
    ),
  ];
  return `${s.name}${types.length ? ` (${types.join(', ')})` : ''}: ${s.rowIds.length} run${s.rowIds.length === 1 ? '' : 's'}`;
}

/** The sentence above the plot: how many runs are plotted and how many are left out. */
export function trendNoteText(plotted: number, rows: number): string {
  const without = rows - plotted;
  return `${plotted} run${plotted === 1 ? '' : 's'} plotted${without ? `; ${without} without a value for both axes left out` : ''}. Click a point (or Tab to it and press Enter) to open that run.`;
}

/** Why the plot is empty. */
export function emptyTrendText(xKey: string): string {
  return xKey === USER_KEY
    ? 'Type values in the table’s “Your value” column to plot against them.'
    : 'No run has a value for both quantities.';
}

export interface TrendAxes {
  x: string;
  y: string;
  xOptions: { value: string; label: string }[];
  yOptions: { value: string; label: string }[];
}

/**
 * The axis choices of a table: y any non-structural column, x a structural descriptor or the typed value.
 * An axis whose key the table lacks falls back to the first choice.
 */
export function trendAxes(t: CompareTable, x: string, y: string): TrendAxes {
  const title = (k: string): string => columnTitle(t.columns, k);
  const numeric: CompareColumn[] = t.columns.filter((c) => c.group !== 'structure');
  const yKey = numeric.some((c) => c.key === y) ? y : (numeric[0]?.key ?? 'gap');
  const xOptions = [
    ...t.descriptorKeys.map((k) => ({ value: k, label: title(k) })),
    { value: USER_KEY, label: 'Your value (typed in the table)' },
  ];
  const xKey = xOptions.some((o) => o.value === x) ? x : xOptions[0]!.value;
  return { x: xKey, y: yKey, xOptions, yOptions: numeric.map((c) => ({ value: c.key, label: title(c.key) })) };
}
