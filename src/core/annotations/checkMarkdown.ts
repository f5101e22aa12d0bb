/**
 * What `valleyscope check --format md` prints for a review comment: one summary table (run, status, what
 * moved), then a collapsed <details> block with one line per run (gap, each entry with its masses, review
 * status and note, and every stale or drifted item), and the cautions once at the end (they are the same for
 * every run; a run's own warnings stay in its line). Short enough to read in a comment: the table has one
 * row per run and the details one line per run, however many entries and branch masses there are.
 */
import { entryTitle, type AnnotatedEntry, type AnnotationsDoc } from './annotationsModel';
import type { CheckResult } from './checkAnnotations';
import { formatNumber } from './numberFormat';

export type CheckedFile =
  | { file: string; doc: AnnotationsDoc; result: CheckResult; error: null }
  | { file: string; doc: AnnotationsDoc | null; result: null; error: string };

/** Text safe inside a Markdown table cell or list item. */
export function mdCell(s: string): string {
  return s
    .replace(/\\/g, '\\\\')
    .replace(/\|/g, '\\|')
    .replace(/\r?\n|\r/g, ' ')
    .replace(/([`*_<>[\]])/g, '\\$1');
}

const code = (s: string): string => `\`${s.replace(/`/g, "'")}\``;

/** Masses of an entry, compact: "X −0.287/−0.287/−0.163, L −0.706" (branches of one direction together). */
export function compactMasses(e: AnnotatedEntry): string {
  const byDir = new Map<string, string[]>();
  for (const m of e.masses) {
    const list = byDir.get(m.towards || '?') ?? [];
    // An undetermined mass is never quoted as a bare number (its value is in the file with the reason).
    list.push(m.mass === null ? 'n/a' : m.determined === false ? 'undetermined' : m.mass.toFixed(3));
    byDir.set(m.towards || '?', list);
  }
  return [...byDir.entries()].map(([d, ms]) => `${d} ${ms.join('/')}`).join(', ');
}

function status(o: CheckedFile): string {
  if (o.error !== null) return '**could not be checked**';
  const r = o.result;
  if (r.ok) return 'ok';
  return `**${[r.stale.length ? 'stale' : '', r.drifted.length ? 'drifted' : ''].filter(Boolean).join(', ')}**`;
}

function whatMoved(o: CheckedFile): string {
  if (o.error !== null) return mdCell(o.error);
  const items = [...o.result.stale, ...o.result.drifted];
  if (items.length === 0) return '—';
  const first = items
    .slice(0, 2)
    .map((c) => mdCell(c.message))
    .join('; ');
  return items.length > 2 ? `${first}; ${items.length - 2} more below` : first;
}

function gapText(doc: AnnotationsDoc | null): string {
  if (!doc) return '';
  if (doc.gap) return `${formatNumber(doc.gap.eV, 'energy')} ${doc.gap.direct ? 'direct' : 'indirect'}`;
  return doc.metal ? 'metal' : 'undetermined';
}

function reviewText(doc: AnnotationsDoc | null): string {
  if (!doc || doc.entries.length === 0) return '';
  const reviewed = doc.entries.filter((e) => e.status !== 'unreviewed').length;
  return `${reviewed}/${doc.entries.length}`;
}

function entryText(e: AnnotatedEntry): string {
  const parts = [mdCell(entryTitle(e))];
  if (!e.found) parts.push('**not found in the latest analysis**');
  const m = compactMasses(e);
  if (m) parts.push(`m* ${mdCell(m)}`);
  if (e.valleyDegeneracy !== null) parts.push(`N_v ${e.valleyDegeneracy}`);
  if (e.status !== 'unreviewed') parts.push(mdCell(e.status));
  if (e.note.trim() !== '') parts.push(`“${mdCell(e.note.trim())}”`);
  return parts.join(', ');
}

function detailsLine(o: CheckedFile): string {
  const out: string[] = [];
  if (o.doc) {
    out.push(
      o.doc.gap ? `gap ${formatNumber(o.doc.gap.eV, 'energy')} eV, ${o.doc.gap.direct ? 'direct' : 'indirect'}` : `gap ${gapText(o.doc)}`,
    );
    for (const e of o.doc.entries) out.push(entryText(e));
    if (o.doc.note.trim() !== '') out.push(`note: “${mdCell(o.doc.note.trim())}”`);
    for (const w of o.doc.warnings) out.push(`warning: ${mdCell(w)}`);
  }
  if (o.result)
    for (const c of [...o.result.stale, ...o.result.drifted])
      out.push(`**${o.result.stale.includes(c) ? 'stale' : 'drifted'}:** ${mdCell(c.message)}`);
  if (o.error !== null) out.push(`could not be checked: ${mdCell(o.error)}`);
  return `- ${code(o.file)}: ${out.join(' · ')}`;
}

export function checkMarkdown(outcomes: readonly CheckedFile[], summary: string): string {
  const out = [`**Valleyscope check:** ${summary}`, ''];
  out.push('| run | status | gap (eV) | reviewed | what moved |', '|---|---|---|---:|---|');
  for (const o of outcomes) out.push(`| ${code(o.file)} | ${status(o)} | ${gapText(o.doc)} | ${reviewText(o.doc)} | ${whatMoved(o)} |`);
  out.push(
    '',
    '<details><summary>Entries, masses (m_e, signed: negative at a maximum; branch by branch separated by /), notes</summary>',
    '',
  );
  for (const o of outcomes) out.push(detailsLine(o));
  out.push('', '</details>');
  const cautions = [...new Set(outcomes.flatMap((o) => o.doc?.cautions ?? []))];
  if (cautions.length) {
    out.push('', 'Cautions:');
    for (const c of cautions) out.push(`- ${mdCell(c)}`);
  }
  return out.join('\n');
}
