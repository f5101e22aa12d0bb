/**
 * A comparison as text: aligned tables within 120 columns, CSV in long form (one row per run × extremum ×
 * quantity × direction × branch), Markdown for a review comment, or JSON.
 *
 * Mass differences are on magnitudes, (|m| − |m_ref|)/|m_ref| (positive: the carrier got heavier, electron
 * or hole), each on its own row with its direction and branch. Strain is relative to the reference run, and
 * says so. Energies of extrema are shown against the energy zero of each run (default its VBM).
 * Parts: comparisonCsv.ts (the CSV), comparisonCells.ts (cells shared by every format).
 */
import type { Comparison, ComparedRun, MassChange } from './compareRuns';
import { fmt } from '../report/summaryText';
import type { EnergyZero } from '../report/energyZero';
import { energyZeroName } from '../report/energyZero';
import { num, pct, signed, valleyName, zeroOf } from './comparisonCells';
import { comparisonCsv } from './comparisonCsv';

export type ComparisonFormat = 'table' | 'csv' | 'md' | 'json';

export interface ComparisonFormatOptions {
  /** Per run name: the zero its extrema energies are shown against. Absent: raw energies. */
  zeros?: Record<string, EnergyZero>;
}

/** Widest line of the text table. */
export const TABLE_WIDTH = 120;

interface Table {
  header: string[];
  rows: string[][];
}

/** Short names for runs when their names would not fit: "#1", "#2", … with a legend. */
function runNames(c: Comparison): { short: Map<string, string>; legend: string[] } {
  const long = c.runs.some((r) => r.name.length > 28);
  const short = new Map<string, string>();
  const legend: string[] = [];
  c.runs.forEach((r, i) => {
    short.set(r.name, long ? `#${i + 1}` : r.name);
    if (long) legend.push(`  #${i + 1}  ${r.name}${r.isReference ? '  (reference)' : ''}${r.stale ? '  [stale]' : ''}`);
  });
  return { short, legend };
}

function hasInPlane(c: Comparison): boolean {
  return c.runs.some((r) => r.descriptors?.inPlaneStrain !== null && r.descriptors?.inPlaneStrain !== undefined);
}

function summaryTable(c: Comparison, short: Map<string, string>): Table {
  const strainCol = c.runs.some((r) => r.descriptors?.volumeStrain !== null && r.descriptors?.volumeStrain !== undefined);
  const inPlane = hasInPlane(c);
  const header = ['run', 'gap (eV)', 'Δgap (eV)', 'type', 'VBM', 'CBM', 'volume (Å³)'];
  if (strainCol) header.push('vol. strain (%)*');
  if (inPlane) header.push('in-plane (%)*');
  const rows = c.runs.map((r) => {
    const row = [
      `${short.get(r.name)}${r.isReference ? ' (ref)' : ''}${r.stale ? ' [stale]' : ''}`,
      r.metal ? 'metal' : num(r.gap_eV, 4),
      r.isReference ? '' : signed(r.deltaGap_eV, 4),
      r.direct === null ? '' : r.direct ? 'direct' : 'indirect',
      r.vbm ?? '',
      r.cbm ?? '',
      num(r.descriptors?.volume, 3),
    ];
    if (strainCol) row.push(pct(r.descriptors?.volumeStrain, 2));
    if (inPlane) row.push(pct(r.descriptors?.inPlaneStrain, 2));
    return row;
  });
  return { header, rows };
}

function valleyTable(c: Comparison, short: Map<string, string>, o: ComparisonFormatOptions): Table {
  const header = ['valley', 'run', 'role', 'E (eV)†', 'offset (meV)', 'Δoffset (meV)', 'N_v', 'm_dos', 'm_c', 'note'];
  const rows: string[][] = [];
  for (const col of c.columns) {
    for (const r of c.runs) {
      const v = r.valleys[col.id];
      if (!v) continue;
      const e = v.extremum;
      const z = zeroOf(o, r.name);
      const note = [
        v.split.length ? 'valley split' : '',
        v.degeneracyChanged ? 'degeneracy changed' : '',
        e.degenerateBands > 1 ? `${e.degenerateBands} bands` : '',
      ]
        .filter(Boolean)
        .join('; ');
      rows.push([
        valleyName(col, c),
        short.get(r.name)!,
        e.kind,
        num(e.eV - (z?.eV ?? 0), 4),
        fmt(v.offset_eV * 1000, 1),
        v.deltaOffset_eV === null || r.isReference ? '' : signed(v.deltaOffset_eV * 1000, 1),
        e.valleyDegeneracy === null ? '' : String(e.valleyDegeneracy),
        num(e.dosMass, 3),
        num(e.conductivityMass, 3),
        note,
      ]);
    }
  }
  return { header, rows };
}

function massDifference(m: MassChange): string {
  if (m.status === 'compared') return `${pct(m.relativeChange, 1)} %`;
  if (m.status === 'reference') return '';
  return m.status;
}

function massTable(c: Comparison, short: Map<string, string>): Table {
  const header = ['valley', 'direction', 'branch', 'run', 'm* (m_e)', '|m*| vs ref'];
  const rows: string[][] = [];
  for (const col of c.columns) {
    // One row per direction and branch, runs together under it.
    const keys: { direction: string; branch: number | null }[] = [];
    for (const r of c.runs) {
      for (const m of r.valleys[col.id]?.masses ?? []) {
        if (!keys.some((k) => k.direction === m.direction && k.branch === m.branch))
          keys.push({ direction: m.direction, branch: m.branch });
      }
    }
    for (const k of keys) {
      for (const r of c.runs) {
        for (const m of r.valleys[col.id]?.masses ?? []) {
          if (m.direction !== k.direction || m.branch !== k.branch) continue;
          rows.push([
            valleyName(col, c),
            k.direction,
            k.branch === null ? '' : String(k.branch),
            short.get(r.name)!,
            fmt(m.mass, 3),
            massDifference(m),
          ]);
        }
      }
    }
  }
  return { header, rows };
}

function aligned(t: Table): string[] {
  const widths = t.header.map((h, i) => Math.max(h.length, ...t.rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]): string =>
    cells
      .map((x, i) => x.padEnd(widths[i]!))
      .join('  ')
      .trimEnd();
  return [line(t.header), widths.map((w) => '-'.repeat(w)).join('  '), ...t.rows.map(line)];
}

/** Lines longer than the width are wrapped at spaces, continuation lines indented. */
function wrap(lines: string[], width: number = TABLE_WIDTH): string[] {
  const out: string[] = [];
  for (const l of lines) {
    if ([...l].length <= width) {
      out.push(l);
      continue;
    }
    const indent = (/^\s*/.exec(l)?.[0] ?? '') + '    ';
    let rest = l;
    let first = true;
    while ([...rest].length > width - (first ? 0 : indent.length)) {
      const room = width - (first ? 0 : indent.length);
      let cut = rest.lastIndexOf(' ', room);
      if (cut <= 0) cut = room;
      out.push((first ? '' : indent) + rest.slice(0, cut).trimEnd());
      rest = rest.slice(cut).trimStart();
      first = false;
    }
    if (rest) out.push((first ? '' : indent) + rest);
  }
  return out;
}

function markdown(t: Table): string {
  const esc = (s: string): string => s.replace(/\|/g, '\\|');
  return [
    `| ${t.header.map(esc).join(' | ')} |`,
    `|${t.header.map(() => '---').join('|')}|`,
    ...t.rows.map((r) => `| ${r.map(esc).join(' | ')} |`),
  ].join('\n');
}

function eventsText(c: Comparison, short: Map<string, string>, bullet: string): string[] {
  return c.events.map((e) => `${bullet}${short.get(e.run) ?? e.run}: ${e.message}`);
}

function footnotes(c: Comparison, o: ComparisonFormatOptions): string[] {
  const out: string[] = [];
  const relative = c.runs.some((r) => r.relativeTo !== null && !r.isReference);
  if (relative) out.push(`* Strain relative to ${c.reference} (the reference run), not to an unstrained crystal.`);
  const zeros = new Set(Object.values(o.zeros ?? {}).map((z) => energyZeroName(z)));
  out.push(
    `† Energies relative to ${zeros.size === 0 ? 'nothing (raw, as each code wrote them)' : [...zeros].map((z) => `the ${z}`).join(' / ')} of each run.`,
  );
  out.push('Mass differences are on magnitudes, (|m| − |m_ref|)/|m_ref|: positive means heavier, for electrons and holes alike.');
  return out;
}

const CAUTION =
  'Gaps from semilocal DFT are usually underestimated; compare runs made with the same functional, spin-orbit treatment and k-path.';

export function formatComparison(c: Comparison, format: ComparisonFormat, options: ComparisonFormatOptions = {}): string {
  const { short, legend } = runNames(c);
  switch (format) {
    case 'json':
      return JSON.stringify(c, (_k, v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? Number(v.toPrecision(10)) : v), 2);
    case 'csv':
      return comparisonCsv(c, options);
    case 'md': {
      const out = [`### Band-structure comparison (reference: ${c.reference})`, ''];
      if (legend.length) out.push(...legend.map((l) => `- ${l.trim()}`), '');
      out.push(markdown(summaryTable(c, short)));
      if (c.columns.length)
        out.push('', '#### Valleys', '', markdown(valleyTable(c, short, options)), '', '#### Masses', '', markdown(massTable(c, short)));
      if (c.events.length) out.push('', '#### What changed', '', ...eventsText(c, short, '- '));
      out.push('', ...footnotes(c, options).map((f) => `_${f}_`), '', `_${CAUTION}_`);
      return out.join('\n');
    }
    default: {
      const out = [`Reference: ${c.reference}`];
      if (legend.length) out.push(...legend);
      out.push('', ...aligned(summaryTable(c, short)));
      if (c.columns.length) out.push('', ...aligned(valleyTable(c, short, options)), '', ...aligned(massTable(c, short)));
      if (c.events.length) out.push('', 'What changed:', ...eventsText(c, short, '  - '));
      out.push('', ...footnotes(c, options), CAUTION);
      return wrap(out).join('\n');
    }
  }
}

export type { ComparedRun };
