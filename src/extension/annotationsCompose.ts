/**
 * The text to save as `<file>.valleys.json`: the fresh analysis (with the fits the reviewer chose in the
 * band view) merged with what the file already holds, so no note, status or hand-added field is lost.
 * The chosen fits go through the core's one definition of an annotated extremum (core/annotations/chosenFits:
 * each entry records its window and method, and `check` redoes exactly that fit). Pure; the writer decides
 * how the text reaches the disk.
 */
import type { BandSource, BandStructure, Report } from '../core/model';
import type { AnalysisSettings } from '../core/analysis/analyze';
import { buildAnnotations } from '../core/annotations/buildAnnotations';
import { chosenFromDoc, withChosenFits, type ChosenExtremum } from '../core/annotations/chosenFits';
import { mergeAnnotations } from '../core/annotations/mergeAnnotations';
import { parseAnnotations } from '../core/annotations/parseAnnotations';
import { serializeAnnotations } from '../core/annotations/serializeAnnotations';
import { placeKey, type AnnotationsDoc } from '../core/annotations/annotationsModel';

export interface ChosenFit extends ChosenExtremum {
  note?: string;
}

export interface ComposeInput {
  /** The run's bands (the chosen fits are redone on them). */
  bs: BandStructure;
  /** The analysis of the run with `settings`. */
  report: Report;
  source: BandSource;
  settings: AnalysisSettings;
  toolVersion: string;
  /** The extrema the reviewer fitted in the view, with the window and method of each. */
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

/** Throws the annotations reader's error (with line and column) when the existing text cannot be read. */
export function composeAnnotations(input: ComposeInput): Composed {
  const warnings: string[] = [];
  const older =
    input.existingText !== null && input.existingText.trim() !== ''
      ? parseAnnotations(input.existingText, input.existingName, warnings)
      : null;
  // Fits chosen before (recorded in the file) are redone as recorded; the view's fits come last and win.
  const before = older ? chosenFromDoc(older, input.bs) : [];
  const { report, fits, placed } = withChosenFits(input.bs, input.report, input.settings, [...before, ...input.fits]);
  let doc = buildAnnotations(report, input.source, input.settings, { toolVersion: input.toolVersion, fits });
  if (older) doc = mergeAnnotations(older, doc);
  input.fits.forEach((f, i) => {
    const key = placed[before.length + i]!;
    const e = doc.entries.find((x) => x.found && placeKey(x) === key);
    if (e) e.note = joinNotes(e.note, f.note);
  });
  doc.note = joinNotes(doc.note, input.runNote);
  return {
    text: serializeAnnotations(doc),
    doc,
    warnings,
    counts: { entries: doc.entries.length, fromView: input.fits.length, notFound: doc.entries.filter((e) => !e.found).length },
  };
}
