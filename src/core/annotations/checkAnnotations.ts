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
 * annotatedSources). `freshReport`: the analysis of the data now, made with the settings the document
 * records (analysisSettingsOf(doc)).
 */
export function checkAnnotations(
  doc: AnnotationsDoc,
  currentSources: readonly CurrentSource[],
  freshReport: Report,
  tolerances: Tolerances = DEFAULT_TOLERANCES,
): CheckResult {
  const stale = compareSources(doc.sources, currentSources);
  const fresh = buildAnnotations(
    freshReport,
    { format: doc.format, file: freshReport.file, files: [] },
    { ...doc.settings },
    { toolVersion: doc.toolVersion },
  );
  const drifted = compareResults(doc, fresh, tolerances);
  return { ok: stale.length === 0 && drifted.length === 0, stale, drifted };
}
