/**
 * Merge, never clobber: the numbers come from the fresh analysis; everything a person wrote comes from the
 * older file. Every note, status and hand-added field survives; an entry the fresh analysis no longer finds
 * is kept with `found: false` (its numbers as they were), never deleted.
 *
 * mergeWithSummary also says what happened to each older entry: kept (same id), moved (the same extremum
 * under a new id: its k moved, the file was migrated, or the run changed between spin-polarised and not),
 * folded (two spin channels' entries now one) or orphaned (no longer found, kept with `found: false`).
 *
 * What is not carried over: a source file the run no longer uses is dropped from `sources` (the list says
 * what the numbers now come from), and the gap's hand-added fields are dropped when the run has no gap.
 */
import { emptyExtra, type AnnotatedEntry, type AnnotatedMass, type AnnotationsDoc, type ExtraFields } from './annotationsModel';
import { massKeys, matchEntries } from './matchEntries';
import { sortEntries } from './serializeAnnotations';

function mergeExtra(older: ExtraFields, newer: ExtraFields): ExtraFields {
  const out = emptyExtra();
  for (const k of Object.keys(older)) out[k] = older[k]!;
  for (const k of Object.keys(newer)) out[k] = newer[k]!;
  return out;
}

function mergeMasses(older: readonly AnnotatedMass[], newer: readonly AnnotatedMass[]): AnnotatedMass[] {
  const oldKeys = massKeys(older);
  const byKey = new Map(oldKeys.map((k, i) => [k, older[i]!]));
  const newKeys = massKeys(newer);
  return newer.map((m, i) => {
    const o = byKey.get(newKeys[i]!);
    return o ? { ...m, extra: mergeExtra(o.extra, m.extra) } : m;
  });
}

function mergeEntry(older: AnnotatedEntry, newer: AnnotatedEntry): AnnotatedEntry {
  return {
    ...newer,
    status: older.status,
    note: older.note,
    found: true,
    masses: mergeMasses(older.masses, newer.masses),
    tensor: newer.tensor && older.tensor ? { ...newer.tensor, extra: mergeExtra(older.tensor.extra, newer.tensor.extra) } : newer.tensor,
    extra: mergeExtra(older.extra, newer.extra),
  };
}

/** What happened to one older entry in a merge. */
export interface EntryFate {
  /** Id in the older file (as it would be written now, for a migrated file). */
  from: string;
  /** Id in the merged file. */
  to: string;
  /** The entry carried a note or a status other than 'unreviewed'. */
  reviewed: boolean;
}

export interface MergeSummary {
  kept: EntryFate[];
  moved: EntryFate[];
  folded: EntryFate[];
  orphaned: EntryFate[];
  /** Ids of entries new in this analysis. */
  added: string[];
}

const isReviewed = (e: AnnotatedEntry): boolean => e.note.trim() !== '' || e.status !== 'unreviewed';

/** The entry standing for both spin channels takes the second channel's note and, if it had none, its status. */
function fold(into: AnnotatedEntry, other: AnnotatedEntry): AnnotatedEntry {
  const note =
    other.note.trim() === '' || into.note.includes(other.note)
      ? into.note
      : into.note.trim() === ''
        ? other.note
        : `${into.note}\n(spin down) ${other.note}`;
  const status = into.status === 'unreviewed' ? other.status : into.status;
  return { ...into, note, status, extra: mergeExtra(other.extra, into.extra) };
}

export function mergeWithSummary(older: AnnotationsDoc, fresh: AnnotationsDoc): { doc: AnnotationsDoc; summary: MergeSummary } {
  const m = matchEntries(older.entries, fresh.entries);
  const summary: MergeSummary = { kept: [], moved: [], folded: [], orphaned: [], added: [] };
  const merged = new Map<number, AnnotatedEntry>();
  for (const [i, j] of m.pairs) {
    const o = older.entries[i]!;
    merged.set(j, mergeEntry(o, fresh.entries[j]!));
    (o.id === fresh.entries[j]!.id ? summary.kept : summary.moved).push({ from: o.id, to: fresh.entries[j]!.id, reviewed: isReviewed(o) });
  }
  for (const [i, j] of m.folded) {
    const o = older.entries[i]!;
    merged.set(j, fold(merged.get(j)!, o));
    summary.folded.push({ from: o.id, to: fresh.entries[j]!.id, reviewed: isReviewed(o) });
  }
  const entries: AnnotatedEntry[] = [...merged.values()];
  for (const i of m.onlyOld) {
    const o = older.entries[i]!;
    // Kept as it was, its spin channel named as before (its id stays unique).
    entries.push({ ...o, found: false });
    summary.orphaned.push({ from: o.id, to: o.id, reviewed: isReviewed(o) });
  }
  for (const j of m.onlyNew) {
    entries.push(fresh.entries[j]!);
    summary.added.push(fresh.entries[j]!.id);
  }
  return { doc: assemble(older, fresh, entries), summary };
}

export function mergeAnnotations(older: AnnotationsDoc, fresh: AnnotationsDoc): AnnotationsDoc {
  return mergeWithSummary(older, fresh).doc;
}

function assemble(older: AnnotationsDoc, fresh: AnnotationsDoc, entries: AnnotatedEntry[]): AnnotationsDoc {
  const oldSources = new Map(older.sources.map((s) => [s.path, s]));
  return {
    ...fresh,
    sources: fresh.sources.map((s) => {
      const o = oldSources.get(s.path);
      return o ? { ...s, extra: mergeExtra(o.extra, s.extra) } : s;
    }),
    settings: { ...fresh.settings, extra: mergeExtra(older.settings.extra, fresh.settings.extra) },
    gap: fresh.gap && older.gap ? { ...fresh.gap, extra: mergeExtra(older.gap.extra, fresh.gap.extra) } : fresh.gap,
    note: older.note !== '' ? older.note : fresh.note,
    entries: sortEntries(entries),
    extra: mergeExtra(older.extra, fresh.extra),
  };
}
