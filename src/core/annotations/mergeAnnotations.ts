/**
 * Merge, never clobber: the numbers come from the fresh analysis; everything a person wrote comes from the
 * older file. Every note, status and hand-added field survives; an entry the fresh analysis no longer finds
 * is kept with `found: false` (its numbers as they were), never deleted.
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

export function mergeAnnotations(older: AnnotationsDoc, fresh: AnnotationsDoc): AnnotationsDoc {
  const m = matchEntries(older.entries, fresh.entries);
  const entries: AnnotatedEntry[] = [];
  for (const [i, j] of m.pairs) entries.push(mergeEntry(older.entries[i]!, fresh.entries[j]!));
  for (const i of m.onlyOld) entries.push({ ...older.entries[i]!, found: false });
  for (const j of m.onlyNew) entries.push(fresh.entries[j]!);

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
