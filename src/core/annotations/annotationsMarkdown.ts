/**
 * A Markdown summary of an annotations file for a review comment: the gap, one table row per entry with its
 * masses, valley degeneracy, review status and note, what a check found, and the cautions that keep the
 * numbers from misleading.
 */
import { entryTitle, type AnnotatedEntry, type AnnotationsDoc } from './annotationsModel';
import type { CheckResult } from './checkAnnotations';
import { formatNumber } from './numberFormat';

/** Text safe inside a Markdown table cell. */
function cell(s: string): string {
  return s
    .replace(/\\/g, '\\\\')
    .replace(/\|/g, '\\|')
    .replace(/\r?\n|\r/g, ' ')
    .replace(/([`*_<>[\]])/g, '\\$1');
}

function massesText(e: AnnotatedEntry): string {
  if (e.masses.length === 0) return '—';
  return e.masses
    .map(
      (m) =>
        `${m.mass === null ? 'n/a' : m.determined === false ? `undetermined (${formatNumber(m.mass, 'mass')})` : formatNumber(m.mass, 'mass')} towards ${m.towards || '?'} (${m.method}, ${m.points} pts, ${formatNumber(m.window_meV, 'meV')} meV)`,
    )
    .join('; ');
}

function entryRow(e: AnnotatedEntry): string {
  const cols = [
    `${cell(entryTitle(e))}${e.found ? '' : ' — **not found in the latest analysis**'}`,
    formatNumber(e.energy_eV, 'energy'),
    cell(massesText(e)),
    e.valleyDegeneracy === null ? '—' : String(e.valleyDegeneracy),
    e.dosMass === null ? '—' : formatNumber(e.dosMass, 'mass'),
    e.conductivityMass === null ? '—' : formatNumber(e.conductivityMass, 'mass'),
    cell(e.status),
    e.note === '' ? '' : cell(e.note),
  ];
  return `| ${cols.join(' | ')} |`;
}

export function annotationsMarkdown(doc: AnnotationsDoc, fileName: string, check: CheckResult | null = null): string {
  const out: string[] = [];
  const state = check === null ? '' : check.ok ? ' — matches its data' : ' — **needs attention**';
  out.push(`### Valleyscope annotations: \`${fileName.replace(/`/g, "'")}\`${state}`, '');
  if (doc.gap) {
    const g = doc.gap;
    out.push(
      `**Gap:** ${formatNumber(g.eV, 'energy')} eV, ${g.direct ? 'direct' : 'indirect'} ` +
        `(VBM band ${g.vbm.band}${g.vbm.label ? ` at ${cell(g.vbm.label)}` : ''}, CBM band ${g.cbm.band}${g.cbm.label ? ` at ${cell(g.cbm.label)}` : ''}); ` +
        `smallest direct gap ${formatNumber(g.directGap.eV, 'energy')} eV.`,
    );
  } else if (doc.metal) {
    out.push('**Gap:** none — the run is metallic.');
  } else {
    out.push('**Gap:** not determined.');
  }
  const s = doc.settings;
  out.push(
    '',
    `Settings: ${cell(s.method)} fit, ${formatNumber(s.window_meV, 'plain')} meV window, extrema within ${formatNumber(s.range_eV, 'plain')} eV of the edges, degeneracy within ${formatNumber(s.degeneracy_meV, 'plain')} meV${s.forceSpinorbit ? ', read as spin-orbit' : ''}${s.alat_angstrom !== null ? `, alat ${formatNumber(s.alat_angstrom, 'plain')} Å` : ''}${s.structureFile !== null ? `, structure from ${cell(s.structureFile)}` : ''}. Masses are signed curvature masses in m_e (negative at a maximum).`,
    '',
  );
  if (doc.note !== '') out.push(`> ${cell(doc.note)}`, '');
  if (doc.entries.length > 0) {
    out.push('| Extremum | E (eV) | Masses (m_e), direction (fit) | N_v | m_dos | m_c | Status | Note |');
    out.push('|---|---:|---|---:|---:|---:|---|---|');
    for (const e of doc.entries) out.push(entryRow(e));
    out.push('');
  }
  const counts = new Map<string, number>();
  for (const e of doc.entries) counts.set(e.status, (counts.get(e.status) ?? 0) + 1);
  if (doc.entries.length > 0) {
    out.push(`Review: ${[...counts.entries()].map(([k, v]) => `${v} ${cell(k)}`).join(', ')}.`, '');
  }
  if (check && !check.ok) {
    if (check.stale.length) {
      out.push('**Stale** (the data changed since the annotations were written):');
      for (const c of check.stale) out.push(`- ${cell(c.message)}`);
      out.push('');
    }
    if (check.drifted.length) {
      out.push('**Drifted** (re-analysis with the recorded settings gives other numbers):');
      for (const c of check.drifted) out.push(`- ${cell(c.message)}`);
      out.push('');
    }
  }
  if (doc.warnings.length) {
    out.push('Warnings:');
    for (const w of doc.warnings) out.push(`- ${cell(w)}`);
    out.push('');
  }
  if (doc.cautions.length) {
    out.push('Cautions:');
    for (const c of doc.cautions) out.push(`- ${cell(c)}`);
    out.push('');
  }
  return out.join('\n');
}
