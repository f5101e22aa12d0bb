/** Annotations beside the data: model, reader, stable writer, merge, comparison, check, Markdown summary. */
export * from './annotationsModel';
export { parseAnnotations, ANNOTATIONS_FORMAT } from './parseAnnotations';
export { serializeAnnotations, sortEntries, compareEntries } from './serializeAnnotations';
export { formatNumber, roundAs, type NumberStyle } from './numberFormat';
export {
  buildAnnotations,
  entriesFromReport,
  annotatedSources,
  analysisSettingsOf,
  recordedSettings,
  relativePath,
  bandFromEdge,
  type BuildOptions,
  type RecordedSettings,
} from './buildAnnotations';
export { mergeAnnotations, mergeWithSummary, type EntryFate, type MergeSummary } from './mergeAnnotations';
export { matchEntries, kDistance, K_MATCH_DISTANCE } from './matchEntries';
export {
  compareAnnotations,
  compareResults,
  compareSources,
  compareSettings,
  DEFAULT_TOLERANCES,
  EXACT_TOLERANCES,
  type AnnotationChange,
  type ChangeKind,
  type Tolerances,
} from './compareAnnotations';
export { checkAnnotations, type CheckResult, type CurrentSource } from './checkAnnotations';
export { annotationsMarkdown } from './annotationsMarkdown';
export { checkMarkdown, compactMasses, type CheckedFile } from './checkMarkdown';
