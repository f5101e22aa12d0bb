/**
 * The text to write as `<data file>.valleys.json`, built once for the CLI's `annotate` and the editor's save:
 * the fresh analysis, with the fits a reviewer chose (those recorded in the file, then those chosen now), built
 * into a document, merged with what the file already holds (no note, status or hand-added field is lost), and
 * serialized. The chosen fits go through the one definition of an annotated extremum (chosenFits.ts), so
 * `check` redoes exactly these fits. Pure; how the text reaches the disk is the caller's (atomicWrite.ts).
 */
import type { BandSource, BandStructure, Report } from '../model';
import { buildAnnotations, type RecordedSettings } from './buildAnnotations';
import { chosenFromDoc, withChosenFits, type ChosenExtremum, type ExtremumFitter } from './chosenFits';
import { mergeWithSummary, type MergeSummary } from './mergeAnnotations';
import { parseAnnotations } from './parseAnnotations';
import { serializeAnnotations } from './serializeAnnotations';
import { placeKey, type AnnotatedSource, type AnnotationsDoc } from './annotationsModel';

/** A fit chosen now (in the band view), with the reviewer's note on it. */
export interface ChosenFit extends ChosenExtremum {
  note?: string;
}

export interface ComposeInput {
  /** The run's bands (the chosen fits are redone on them). */
  bs: BandStructure;
  /** The analysis of the run with `settings`. */
  report: Report;
  source: BandSource;
  /** The analysis settings, and how the run was read (recorded so `check` reads it alike). */
  settings: RecordedSettings;
  toolVersion: string;
  /** The extrema fitted now, with the window and method of each (none for the CLI). */
  fits: ChosenFit[];
  /** A note on the run as a whole, typed now. */
  runNote?: string;
  /** Files read besides the run's own (a structure file given by the user), with their hashes. */
  extraSources?: AnnotatedSource[];
  /** The annotations file's current text (an open editor's, unsaved edits included), or null if none. */
  existingText: string | null;
  /** Name of the annotations file, for messages. */
  existingName: string;
  /** The parse of `existingText` when the caller already has it (read once). */
  existingDoc?: AnnotationsDoc | null;
  /** How the chosen fits are redone (default: fitted now; the editor answers from the fits it already made). */
  fit?: ExtremumFitter;
}

export interface Composed {
  text: string;
  doc: AnnotationsDoc;
  /** The document that was there before (null: none). */
  older: AnnotationsDoc | null;
  /** What happened to the old entries (null: there was no file). */
  summary: MergeSummary | null;
  /** Remarks from reading the existing file (kept fields, unknown statuses). */
  warnings: string[];
  /** How many entries there are, how many fits came from now, how many entries are kept only from the old file. */
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

/** The existing document, or null for no file (or an empty one). Throws the reader's error (line and column). */
export function readExistingAnnotations(text: string | null, name: string, warnings: string[] = []): AnnotationsDoc | null {
  return text !== null && text.trim() !== '' ? parseAnnotations(text, name, warnings) : null;
}

/** Throws the annotations reader's error (with line and column) when the existing text cannot be read. */
export function composeAnnotations(input: ComposeInput): Composed {
  const warnings: string[] = [];
  const older =
    input.existingDoc !== undefined ? input.existingDoc : readExistingAnnotations(input.existingText, input.existingName, warnings);
  // Fits chosen before (recorded in the file) are redone as recorded; the fits chosen now come last and win.
  const before = older ? chosenFromDoc(older, input.bs) : [];
  const { report, fits, placed } = withChosenFits(input.bs, input.report, input.settings, [...before, ...input.fits], input.fit);
  const fresh = buildAnnotations(report, input.source, input.settings, { toolVersion: input.toolVersion, fits });
  fresh.sources.push(...(input.extraSources ?? []));
  const merged = older ? mergeWithSummary(older, fresh) : null;
  const doc = merged ? merged.doc : fresh;
  input.fits.forEach((f, i) => {
    const key = placed[before.length + i]!;
    const e = doc.entries.find((x) => x.found && placeKey(x) === key);
    if (e) e.note = joinNotes(e.note, f.note);
  });
  doc.note = joinNotes(doc.note, input.runNote);
  return {
    text: serializeAnnotations(doc),
    doc,
    older,
    summary: merged ? merged.summary : null,
    warnings,
    counts: { entries: doc.entries.length, fromView: input.fits.length, notFound: doc.entries.filter((e) => !e.found).length },
  };
}
