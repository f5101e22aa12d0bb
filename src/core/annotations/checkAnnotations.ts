/**
 * Does an annotations file still describe its data?
 * - stale: a source file's bytes (SHA-256) differ from the recorded hash, a recorded source is gone, or the
 *   run now reads a file that is not recorded;
 * - drifted: re-analysis with the recorded settings moves a recorded number beyond a tolerance (defaults
 *   1 meV for energies, 2 % for masses), loses an entry, or finds one that is not annotated.
 * A file can be stale without drifting (a comment line changed in the data) and is then still reported:
 * the recorded hashes no longer vouch for the numbers.
 */
import type { Report } from '../model';
import type { AnnotationsDoc } from './annotationsModel';
import { buildAnnotations } from './buildAnnotations';
import type { AnnotatedReport } from './chosenFits';
import { compareResults, compareSources, DEFAULT_TOLERANCES, type AnnotationChange, type Tolerances } from './compareAnnotations';

export interface CurrentSource {
  /** Relative to the folder holding the annotations file. */
  path: string;
  sha256: string;
  role?: string;
}

export interface CheckResult {
  /** True when nothing is stale or drifted. */
  ok: boolean;
  stale: AnnotationChange[];
  drifted: AnnotationChange[];
}

/**
 * `currentSources`: the files the run is read from now, with the SHA-256 of their bytes now (see
 * annotatedSources). `fresh`: the analysis of the data now as the document records it
 * (reanalyzeAsRecorded(doc, bs): its settings, and its chosen fits redone), or a bare Report made with the
 * recorded settings (then entries with a chosen fit are compared with the analysis's own fit).
 */
export function checkAnnotations(
  doc: AnnotationsDoc,
  currentSources: readonly CurrentSource[],
  fresh: Report | AnnotatedReport,
  tolerances: Tolerances = DEFAULT_TOLERANCES,
): CheckResult {
  const stale = compareSources(doc.sources, currentSources);
  const freshReport = 'report' in fresh && 'fits' in fresh ? fresh.report : fresh;
  const fits = 'fits' in fresh && fresh.fits instanceof Map ? fresh.fits : undefined;
  const rebuilt = buildAnnotations(
    freshReport,
    { format: doc.format, file: freshReport.file, files: [] },
    { ...doc.settings },
    { toolVersion: doc.toolVersion, ...(fits ? { fits } : {}) },
  );
  const drifted = compareResults(doc, rebuilt, tolerances);
  return { ok: stale.length === 0 && drifted.length === 0, stale, drifted };
}
