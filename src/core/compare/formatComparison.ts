/** A comparison as text: an aligned table, CSV, Markdown for a review comment, or JSON. */
import type { Comparison, ComparedRun, ValleyColumn } from './compareRuns';
import { fmt } from '../report/summaryText';

export type ComparisonFormat = 'table' | 'csv' | 'md' | 'json';

const signed = (x: number | null, d: number): string => (x === null ? '' : `${x >= 0 ? '+' : ''}${fmt(x, d)}`);
const num = (x: number | null | undefined, d: number): string => (x === null || x === undefined ? '' : fmt(x, d));

interface Table {
  header: string[];
  rows: string[][];
}

function summaryTable(c: Comparison): Table {
  const strainCol = c.runs.some((r) => r.descriptors?.volumeStrain !== null && r.descriptors?.volumeStrain !== undefined);
  const header = ['run', 'gap (eV)', 'Δgap (eV)', 'type', 'VBM', 'CBM', 'volume (Å³)'];
  if (strainCol) header.push('volume strain (%)');
  const rows = c.runs.map((r) => {
    const row = [
      `${r.name}${r.isReference ? ' (reference)' : ''}${r.stale ? ' [stale]' : ''}`,
      r.metal ? 'metal' : num(r.gap_eV, 4),
      r.isReference ? '' : signed(r.deltaGap_eV, 4),
      r.direct === null ? '' : r.direct ? 'direct' : 'indirect',
      r.vbm ?? '',
      r.cbm ?? '',
      num(r.descriptors?.volume, 3),
    ];
    if (strainCol) row.push(r.descriptors?.volumeStrain === null || r.descriptors?.volumeStrain === undefined ? '' : signed(r.descriptors.volumeStrain * 100, 2));
    return row;
  });
  return { header, rows };
}

function valleyTable(c: Comparison): Table {
  const header = ['valley', 'run', 'role', 'offset (meV)', 'Δoffset (meV)', 'N_v', 'masses m* (m_e) by direction', 'Δm/m', 'm_dos', 'm_c'];
  const rows: string[][] = [];
  for (const col of c.columns) {
    for (const r of c.runs) {
      const v = r.valleys[col.id];
      if (!v) continue;
      const e = v.extremum;
      rows.push([
        `${col.id} ${col.side} ${col.where}`,
        r.name,
        e.kind,
        fmt(v.offset_eV * 1000, 1),
        v.deltaOffset_eV === null || r.isReference ? '' : signed(v.deltaOffset_eV * 1000, 1),
        e.valleyDegeneracy === null ? '' : String(e.valleyDegeneracy),
        v.masses.map((m) => `${m.towards}: ${fmt(m.mass, 3)}`).join('; '),
        r.isReference ? '' : v.masses.map((m) => (m.relativeChange === null ? '' : `${signed(m.relativeChange * 100, 1)}%`)).filter(Boolean).join('; '),
        num(e.dosMass, 3),
        num(e.conductivityMass, 3),
      ]);
    }
  }
  return { header, rows };
}

function aligned(t: Table): string {
  const widths = t.header.map((h, i) => Math.max(h.length, ...t.rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]): string => cells.map((x, i) => x.padEnd(widths[i]!)).join('  ').trimEnd();
  return [line(t.header), widths.map((w) => '-'.repeat(w)).join('  '), ...t.rows.map(line)].join('\n');
}

function markdown(t: Table): string {
  const esc = (s: string): string => s.replace(/\|/g, '\\|');
  return [`| ${t.header.map(esc).join(' | ')} |`, `|${t.header.map(() => '---').join('|')}|`, ...t.rows.map((r) => `| ${r.map(esc).join(' | ')} |`)].join('\n');
}

function csvCell(s: string): string {
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function csv(c: Comparison): string {
  const header = ['run', 'reference', 'gap_eV', 'delta_gap_eV', 'direct', 'metal', 'vbm', 'cbm', 'volume_A3', 'volume_strain', 'stale'];
  const cols: ValleyColumn[] = c.columns;
  for (const col of cols) header.push(`${col.id}_offset_meV`, `${col.id}_Nv`, `${col.id}_dos_mass`, `${col.id}_cond_mass`, `${col.id}_masses`);
  const rows = c.runs.map((r: ComparedRun) => {
    const row = [
      r.name,
      String(r.isReference),
      num(r.gap_eV, 6),
      r.isReference ? '' : num(r.deltaGap_eV, 6),
      r.direct === null ? '' : String(r.direct),
      r.metal === null ? '' : String(r.metal),
      r.vbm ?? '',
      r.cbm ?? '',
      num(r.descriptors?.volume, 4),
      r.descriptors?.volumeStrain === null || r.descriptors?.volumeStrain === undefined ? '' : fmt(r.descriptors.volumeStrain, 6),
      String(r.stale),
    ];
    for (const col of cols) {
      const v = r.valleys[col.id];
      row.push(
        v ? fmt(v.offset_eV * 1000, 2) : '',
        v?.extremum.valleyDegeneracy === null || !v ? '' : String(v.extremum.valleyDegeneracy),
        v ? num(v.extremum.dosMass, 4) : '',
        v ? num(v.extremum.conductivityMass, 4) : '',
        v ? v.masses.map((m) => `${m.towards}=${fmt(m.mass, 4)}`).join(';') : '',
      );
    }
    return row;
  });
  return [header, ...rows].map((r) => r.map(csvCell).join(',')).join('\n');
}

function eventsText(c: Comparison, bullet: string): string[] {
  return c.events.map((e) => `${bullet}${e.run}: ${e.message}`);
}

export function formatComparison(c: Comparison, format: ComparisonFormat): string {
  switch (format) {
    case 'json':
      return JSON.stringify(c, (_k, v) => (typeof v === 'number' && Number.isFinite(v) ? Number(v.toPrecision(10)) : v), 2);
    case 'csv':
      return csv(c);
    case 'md': {
      const out = [`### Band-structure comparison (reference: ${c.reference})`, '', markdown(summaryTable(c))];
      if (c.columns.length) out.push('', '#### Valleys and masses', '', markdown(valleyTable(c)));
      if (c.events.length) out.push('', '#### What changed', '', ...eventsText(c, '- '));
      out.push('', '_Gaps from semilocal DFT are usually underestimated; compare runs made with the same functional, spin-orbit treatment and k-path._');
      return out.join('\n');
    }
    default: {
      const out = [`Reference: ${c.reference}`, '', aligned(summaryTable(c))];
      if (c.columns.length) out.push('', aligned(valleyTable(c)));
      if (c.events.length) out.push('', 'What changed:', ...eventsText(c, '  - '));
      return out.join('\n');
    }
  }
}
