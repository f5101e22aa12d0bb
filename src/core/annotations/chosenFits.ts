/**
 * What an annotated extremum is, in one place for every writer and for `check`: the analysis of the run with
 * the recorded settings, and in place of (or beside) its extrema the fits a reviewer chose, each redone with
 * its own window and method at its own band and k-point. The entry of a chosen fit records those settings
 * (`fit` in the file), so whoever re-reads the file (`check`, `annotate`, the next save) redoes the same fit
 * and finds the same numbers: a save followed by `check` is clean by construction.
 */
import type { BandStructure, ExtremumReport, Mat3, Report } from '../model';
import { kpointAt } from '../model';
import { analyzeBandStructure, type AnalysisSettings } from '../analysis/analyze';
import { fitExtremumAt } from '../analysis/massEngine';
import { methodId } from '../analysis/methods';
import { symmetryContext } from '../analysis/valleyCount';
import { valleyRepresentative } from '../lattice/valleyIdentity';
import { placeKey, type AnnotationsDoc } from './annotationsModel';

export { placeKey };
import { analysisSettingsOf } from './buildAnnotations';

/** The fit settings a reviewer chose for one extremum (recorded on its entry as `fit`). */
export interface FitChoice {
  window_meV: number;
  method: string;
}

/** One chosen fit: where (0-based band and k index, as in the arrays) and how. */
export interface ChosenExtremum extends FitChoice {
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  /**
   * Given: the point is that extremum (a maximum or not), fitted exactly there. Absent: the nearest local
   * extremum of the band is fitted (a click between extrema).
   */
  maximum?: boolean;
}

/** Where and how to fit: massEngine.fitExtremumAt's arguments (bands, spin, k index, band, settings, exactly-at). */
type FitAt = [bs: BandStructure, spin: number, kIndex: number, band0: number, settings: AnalysisSettings, at?: { maximum: boolean }];
/** Fits the extremum at a point like fitExtremumAt; a caller may answer from fits made before. */
export type ExtremumFitter = (...args: FitAt) => ExtremumReport;

export interface AnnotatedReport {
  /** The analysis with the chosen fits in place of the same extrema (or added). */
  report: Report;
  /** The fit settings of each chosen extremum, by placeKey of its (spin, band, k). */
  fits: Map<string, FitChoice>;
  /** placeKey of where each choice landed, in the order given (to attach a note to its entry). */
  placed: string[];
}

/**
 * The report an annotations file describes. `chosen` later in the list wins over earlier ones at the same
 * extremum (so the view's fit replaces one recorded before). A chosen fit at an extremum the analysis also
 * lists keeps the analysis's kind and valley (the identity); elsewhere its valley is the star member the
 * analysis would choose. Throws RangeError when a choice lies outside the arrays.
 */
export function withChosenFits(
  bs: BandStructure,
  report: Report,
  settings: AnalysisSettings,
  chosen: readonly ChosenExtremum[],
  fit: ExtremumFitter = fitExtremumAt,
): AnnotatedReport {
  const extrema = [...report.extrema];
  const fits = new Map<string, FitChoice>();
  const placed: string[] = [];
  const offset = bs.bandNumberOffset ?? 0;
  let rotations: readonly Mat3[] | null | undefined;
  for (const c of chosen) {
    const method = methodId(c.method) ?? c.method;
    const how = { ...settings, window_meV: c.window_meV, method };
    const raw = fit(bs, c.spin, c.kIndex, c.band0, how, c.maximum === undefined ? undefined : { maximum: c.maximum });
    const fitted: ExtremumReport = { ...raw, band: raw.band + offset };
    const key = placeKey(fitted);
    const i = extrema.findIndex((x) => placeKey(x) === key);
    if (i >= 0) {
      const listed = extrema[i]!;
      extrema[i] = { ...fitted, kind: listed.kind, ...(listed.valley ? { valley: listed.valley } : {}) };
    } else {
      if (rotations === undefined) rotations = symmetryContext(bs).sym?.reciprocalPointGroup ?? null;
      extrema.push({ ...fitted, valley: valleyRepresentative(fitted.k, rotations) });
    }
    fits.set(key, { window_meV: c.window_meV, method });
    placed.push(key);
  }
  return { report: { ...report, extrema }, fits, placed };
}

/** The k index of the run's k-point at fractional k (within 1e-6 per coordinate), or -1. */
function kIndexOf(bs: BandStructure, k: readonly number[]): number {
  for (let i = 0; i < bs.nk; i++) {
    const q = kpointAt(bs, i);
    if (Math.abs(q[0] - k[0]!) <= 1e-6 && Math.abs(q[1] - k[1]!) <= 1e-6 && Math.abs(q[2] - k[2]!) <= 1e-6) return i;
  }
  return -1;
}

/**
 * The chosen fits an annotations document records (entries with `fit`), placed in this run's arrays. An entry
 * whose band or k-point the run no longer has is left out (the comparison then says it is no longer found).
 */
export function chosenFromDoc(doc: AnnotationsDoc, bs: BandStructure): ChosenExtremum[] {
  const out: ChosenExtremum[] = [];
  const offset = bs.bandNumberOffset ?? 0;
  for (const e of doc.entries) {
    if (!e.fit || !e.found) continue;
    const band0 = e.band - 1 - offset;
    if (e.spin >= bs.nSpin || band0 < 0 || band0 >= bs.nBands) continue;
    const kIndex = kIndexOf(bs, e.k);
    if (kIndex < 0) continue;
    // Redone exactly at the recorded point: the entry is that extremum (its kind says maximum or minimum).
    const maximum = e.kind === 'vbm' || e.kind === 'peak';
    out.push({ spin: e.spin, kIndex, band0, window_meV: e.fit.window_meV, method: e.fit.method, maximum });
  }
  return out;
}

/**
 * The analysis an annotations document describes, redone on `bs`: the recorded settings, and every chosen fit
 * it records redone with its own window and method. What `check` compares the document with.
 */
export function reanalyzeAsRecorded(doc: AnnotationsDoc, bs: BandStructure): AnnotatedReport {
  const settings = analysisSettingsOf(doc);
  return withChosenFits(bs, analyzeBandStructure(bs, settings), settings, chosenFromDoc(doc, bs));
}
