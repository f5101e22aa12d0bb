/**
 * The text to save as `<file>.valleys.json`: the fresh analysis (with the fits the reviewer chose in the
 * band view) merged with what the file already holds, so no note, status or hand-added field is lost.
 * Pure; the writer decides how the text reaches the disk.
 */
import type { BandSource, ExtremumReport, Report } from '../core/model';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { buildAnnotations } from '../core/annotations/buildAnnotations';
import { mergeAnnotations } from '../core/annotations/mergeAnnotations';
import { parseAnnotations } from '../core/annotations/parseAnnotations';
import { serializeAnnotations } from '../core/annotations/serializeAnnotations';
import { layout1EntryId, type AnnotationsDoc } from '../core/annotations/annotationsModel';

export interface ChosenFit {
  /** The extremum as the core fitted it with the reviewer's window and method. */
  extremum: ExtremumReport;
  note?: string;
}

export interface ComposeInput {
  report: Report;
  source: BandSource;
  settings: AnalysisSettings;
  toolVersion: string;
  fits: ChosenFit[];
  /** A note on the run as a whole, typed in the view. */
  runNote?: string;
  /** The annotations file's current text (the open editor's, unsaved edits included), or null if none. */
  existingText: string | null;
  /** Name of the annotations file, for messages. */
  existingName: string;
}

export interface Composed {
  text: string;
  doc: AnnotationsDoc;
  /** Remarks from reading the existing file (kept fields, unknown statuses). */
  warnings: string[];
  /** How many entries were added, updated from the view, or kept only from the old file. */
  counts: { entries: number; fromView: number; notFound: number };
}

/** A note typed now joins what was written before, never replaces it. */
export function joinNotes(before: string, now: string | undefined): string {
  const n = (now ?? '').trim();
  if (n === '') return before;
  if (before.trim() === '') return n;
  if (before.includes(n)) return before;
  return `${before}\n${n}`;
}

/** The report's extrema with the reviewer's fits in place of the same extremum (same kind, spin, band, k). */
export function extremaWithFits(report: Report, fits: ChosenFit[]): ExtremumReport[] {
  const out = [...report.extrema];
  for (const f of fits) {
    const id = layout1EntryId(f.extremum);
    const i = out.findIndex((x) => layout1EntryId(x) === id);
    // The reviewer's fit keeps the valley the analysis named (the star of k needs the crystal's symmetry).
    if (i >= 0) out[i] = { ...f.extremum, valley: f.extremum.valley ?? out[i]!.valley };
    else out.push(f.extremum);
  }
  return out;
}

/** Throws the annotations reader's error (with line and column) when the existing text cannot be read. */
export function composeAnnotations(input: ComposeInput): Composed {
  const report: Report = { ...input.report, extrema: extremaWithFits(input.report, input.fits) };
  let doc = buildAnnotations(report, input.source, input.settings, { toolVersion: input.toolVersion });
  const warnings: string[] = [];
  if (input.existingText !== null && input.existingText.trim() !== '') {
    const older = parseAnnotations(input.existingText, input.existingName, warnings);
    doc = mergeAnnotations(older, doc);
  }
  for (const f of input.fits) {
    // The entry of this very extremum (same kind, spin, band and k; ids name valleys, which is coarser).
    const id = layout1EntryId(f.extremum);
    const e = doc.entries.find((x) => layout1EntryId(x) === id);
    if (e) e.note = joinNotes(e.note, f.note);
  }
  doc.note = joinNotes(doc.note, input.runNote);
  return {
    text: serializeAnnotations(doc),
    doc,
    warnings,
    counts: { entries: doc.entries.length, fromView: input.fits.length, notFound: doc.entries.filter((e) => !e.found).length },
  };
}
