/**
 * A comparison as text: aligned tables within 120 columns, CSV in long form (one row per run × extremum ×
 * quantity × direction × branch), Markdown for a review comment, or JSON.
 *
 * Mass differences are on magnitudes, (|m| − |m_ref|)/|m_ref| (positive: the carrier got heavier, electron
 * or hole), each on its own row with its direction and branch. Strain is relative to the reference run, and
 * says so. Energies of extrema are shown against the energy zero of each run (default its VBM).
 */
import type { Comparison, ComparedRun, MassChange, ValleyColumn, ValleyEntry } from './compareRuns';
import { fmt } from '../report/summaryText';
import type { EnergyZero } from '../report/energyZero';
import { energyZeroName } from '../report/energyZero';

export type ComparisonFormat = 'table' | 'csv' | 'md' | 'json';

export interface ComparisonFormatOptions {
  /** Per run name: the zero its extrema energies are shown against. Absent: raw energies. */
  zeros?: Record<string, EnergyZero>;
}

/** Widest line of the text table. */
export const TABLE_WIDTH = 120;

const signed = (x: number | null, d: number): string => (x === null ? '' : `${x >= 0 ? '+' : ''}${fmt(x, d)}`);
const num = (x: number | null | undefined, d: number): string => (x === null || x === undefined || !Number.isFinite(x) ? '' : fmt(x, d));
const pct = (x: number | null | undefined, d: number): string => (x === null || x === undefined ? '' : signed(x * 100, d));

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

function zeroOf(o: ComparisonFormatOptions, run: string): EnergyZero | null {
  return o.zeros?.[run] ?? null;
}

/** A valley as shown: id and place, and its spin channel when any run is spin-polarised (never otherwise). */
function valleyName(col: ValleyColumn, c: Comparison): string {
  const spin = c.runs.some((r) => r.spinPolarised) ? ` ${col.spin === 1 ? 'down' : 'up'}` : '';
  return `${col.id}${spin} ${col.where}`;
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

function csvCell(s: string): string {
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** The CSV columns, in this order (long form). */
export const CSV_COLUMNS = [
  'run',
  'extremum',
  'kind',
  'quantity',
  'direction',
  'branch',
  'value',
  'unit',
  'reference_value',
  'difference',
  'relative_difference',
] as const;

interface CsvRow {
  run: string;
  extremum: string;
  kind: string;
  quantity: string;
  direction?: string;
  branch?: number | null;
  value: number | null;
  unit: string;
  reference: number | null;
  /** Difference and relative difference taken on magnitudes (masses). */
  magnitudes?: boolean;
  isReference: boolean;
}

const g = (x: number | null, d = 6): string => (x === null || !Number.isFinite(x) ? '' : String(Number(x.toPrecision(d + 1))));

function csvLine(r: CsvRow): string[] {
  const a = r.magnitudes && r.value !== null ? Math.abs(r.value) : r.value;
  const b = r.magnitudes && r.reference !== null ? Math.abs(r.reference) : r.reference;
  const diff = !r.isReference && a !== null && b !== null ? a - b : null;
  const rel = diff !== null && b !== null && b !== 0 ? diff / Math.abs(b) : null;
  return [
    r.run,
    r.extremum,
    r.kind,
    r.quantity,
    r.direction ?? '',
    r.branch === null || r.branch === undefined ? '' : String(r.branch),
    g(a),
    r.unit,
    r.isReference ? '' : g(b),
    g(diff),
    g(rel),
  ];
}

function csv(c: Comparison, o: ComparisonFormatOptions): string {
  const rows: string[][] = [[...CSV_COLUMNS]];
  const ref = c.runs.find((r) => r.isReference) ?? null;
  for (const r of c.runs) {
    const base = { run: r.name, isReference: r.isReference };
    rows.push(
      csvLine({
        ...base,
        extremum: 'gap',
        kind: r.metal ? 'metal' : r.direct === null ? '' : r.direct ? 'direct' : 'indirect',
        quantity: 'gap',
        value: r.metal ? 0 : r.gap_eV,
        unit: 'eV',
        reference: ref?.gap_eV ?? null,
      }),
    );
    const d = r.descriptors;
    if (d) {
      const rd = ref?.descriptors ?? null;
      rows.push(
        csvLine({
          ...base,
          extremum: 'cell',
          kind: 'structure',
          quantity: 'volume',
          value: d.volume,
          unit: 'Å^3',
          reference: rd?.volume ?? null,
        }),
      );
      // Strains are themselves relative to the reference run: no second difference is taken.
      if (d.volumeStrain !== null)
        rows.push(
          csvLine({
            ...base,
            isReference: true,
            extremum: 'cell',
            kind: 'structure',
            quantity: 'volume_strain',
            value: d.volumeStrain * 100,
            unit: `% relative to ${c.reference}`,
            reference: null,
          }),
        );
      if (d.inPlaneStrain !== null)
        rows.push(
          csvLine({
            ...base,
            isReference: true,
            extremum: 'cell',
            kind: 'structure',
            quantity: 'in_plane_strain',
            value: d.inPlaneStrain * 100,
            unit: `% relative to ${c.reference}`,
            reference: null,
          }),
        );
    }
    for (const col of c.columns) {
      const v: ValleyEntry | undefined = r.valleys[col.id];
      if (!v) continue;
      const rv = ref?.valleys[col.id];
      const e = v.extremum;
      const z = zeroOf(o, r.name);
      const rz = ref ? zeroOf(o, ref.name) : null;
      const x = { ...base, extremum: valleyName(col, c), kind: e.kind };
      rows.push(
        csvLine({
          ...x,
          quantity: 'energy',
          value: e.eV - (z?.eV ?? 0),
          unit: z ? `eV (zero: ${z.used})` : 'eV',
          reference: rv ? rv.extremum.eV - (rz?.eV ?? 0) : null,
        }),
      );
      rows.push(
        csvLine({ ...x, quantity: 'offset_from_edge', value: v.offset_eV * 1000, unit: 'meV', reference: rv ? rv.offset_eV * 1000 : null }),
      );
      rows.push(
        csvLine({
          ...x,
          quantity: 'valley_degeneracy',
          value: e.valleyDegeneracy,
          unit: '',
          reference: rv?.extremum.valleyDegeneracy ?? null,
        }),
      );
      for (const m of v.masses) {
        rows.push(
          csvLine({
            ...x,
            quantity: 'abs_mass',
            direction: m.direction,
            branch: m.branch,
            value: m.mass,
            unit: 'm_e',
            reference: m.status === 'compared' ? m.referenceMass : null,
            magnitudes: true,
          }),
        );
      }
      rows.push(csvLine({ ...x, quantity: 'dos_mass', value: e.dosMass, unit: 'm_e', reference: rv?.extremum.dosMass ?? null }));
      rows.push(
        csvLine({
          ...x,
          quantity: 'conductivity_mass',
          value: e.conductivityMass,
          unit: 'm_e',
          reference: rv?.extremum.conductivityMass ?? null,
        }),
      );
    }
  }
  return rows.map((r) => r.map(csvCell).join(',')).join('\n');
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
      return csv(c, options);
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
