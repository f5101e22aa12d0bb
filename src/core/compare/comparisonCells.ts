/** Cells of a comparison as shown in every format: signed numbers, percentages, valley names, energy zeros. */
import type { Comparison, ValleyColumn } from './compareRuns';
import type { ComparisonFormatOptions } from './formatComparison';
import { fmt } from '../report/summaryText';
import type { EnergyZero } from '../report/energyZero';

export const signed = (x: number | null, d: number): string => (x === null ? '' : `${x >= 0 ? '+' : ''}${fmt(x, d)}`);
export const num = (x: number | null | undefined, d: number): string =>
  x === null || x === undefined || !Number.isFinite(x) ? '' : fmt(x, d);
export const pct = (x: number | null | undefined, d: number): string => (x === null || x === undefined ? '' : signed(x * 100, d));

export function zeroOf(o: ComparisonFormatOptions, run: string): EnergyZero | null {
  return o.zeros?.[run] ?? null;
}

/** A valley as shown: id and place, and its spin channel when any run is spin-polarised (never otherwise). */
export function valleyName(col: ValleyColumn, c: Comparison): string {
  const spin = c.runs.some((r) => r.spinPolarised) ? ` ${col.spin === 1 ? 'down' : 'up'}` : '';
  return `${col.id}${spin} ${col.where}`;
}
