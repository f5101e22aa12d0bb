/**
 * A comparison as CSV in long form: one row per run × extremum × quantity × direction × branch, with the
 * reference value, the difference and the relative difference (on magnitudes for masses).
 */
import type { Comparison, ValleyEntry } from './compareRuns';
import type { ComparisonFormatOptions } from './formatComparison';
import { valleyName, zeroOf } from './comparisonCells';

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

export function comparisonCsv(c: Comparison, o: ComparisonFormatOptions): string {
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
      for (const [quantity, strain] of [
        ['volume_strain', d.volumeStrain],
        ['in_plane_strain', d.inPlaneStrain],
      ] as const) {
        if (strain === null) continue;
        rows.push(
          csvLine({
            ...base,
            isReference: true,
            extremum: 'cell',
            kind: 'structure',
            quantity,
            value: strain * 100,
            unit: `% relative to ${c.reference}`,
            reference: null,
          }),
        );
      }
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
