/**
 * The compare view's table, built from the core's comparison (src/core/compare/compareRuns.ts): one row per
 * run, numeric columns for the gap, the edges' N_v and averaged masses, the edges' directional masses, every
 * matched valley's offset and masses, and the structural descriptors that serve as trend x-axes. Pure (no
 * `vscode`): the panel gathers the runs, this file only arranges numbers the core computed.
 */
import { compareRuns, type ComparedRun, type Comparison, type RunInput } from '../core/compare/compareRuns';
import type { BandStructure, ExtremumReport, MassFit, Report } from '../core/model';
import type { PathGeometry } from '../core/lattice/kpath';
import { conventionalCubicA } from '../core/compare/structureDescriptors';
import { encodeArray, type CompareBandRun, type CompareColumn, type CompareRow, type CompareTable } from '../protocol';
import { F64_ENERGY_LIMIT } from './bandData';

/** One run as the panel found it. */
export interface CompareEntry {
  /** Row id ("r0", …), stable while the panel lives. */
  id: string;
  /** Workspace-relative path shown to the user. */
  name: string;
  origin: 'data' | 'annotations';
  annotations: 'none' | 'current' | 'stale';
  staleReasons: string[];
  /** Null when it could not be read (then `error` says why). */
  run: RunInput | null;
  error: string | null;
  canOverlay: boolean;
}

export const COMPARE_CAUTIONS = [
  'Gaps from semilocal DFT (LDA/GGA) are usually too small, often by 30–50 %; compare gaps only between runs made with the same method.',
  'Effective masses depend on the functional, on spin–orbit coupling and on strain; compare masses between runs that differ in one of these only.',
  'Masses are signed curvature masses in mₑ (negative at a maximum). Each comes from a fit: its window and points are in the run’s band view.',
];
const ANNOTATIONS_CAUTION =
  'Rows from annotations files show the numbers as they were saved; a stale one no longer matches its data files.';

/** Structural descriptors offered as trend x-axes, in this order. */
export const DESCRIPTOR_COLUMNS: CompareColumn[] = [
  {
    key: 'volumeStrain',
    label: 'Volume strain',
    unit: '%',
    group: 'structure',
    title: 'Cell volume relative to the reference run, minus one (per cent).',
    decimals: 3,
    more: true,
  },
  {
    key: 'inPlaneStrain',
    label: 'In-plane strain',
    unit: '%',
    group: 'structure',
    title: 'Biaxial series: in-plane strain λ∥ − 1 relative to the reference run (per cent); empty when the strain is not biaxial.',
    decimals: 3,
    more: true,
  },
  {
    key: 'hydrostaticStrain',
    label: 'Hydrostatic strain',
    unit: '%',
    group: 'structure',
    title: 'Mean of the diagonal Green–Lagrange strain relative to the reference run (per cent).',
    decimals: 3,
    more: true,
  },
  {
    key: 'aConv',
    label: 'conventional a',
    unit: 'Å',
    group: 'structure',
    title:
      'Conventional cubic lattice constant, from the lattice type and the volume per lattice point (fcc: √2 × the primitive-vector length; bcc: 2/√3 ×). Empty for lattices that are not cubic, strained cubic crystals included.',
    decimals: 4,
  },
  { key: 'volume', label: 'Volume', unit: 'Å³', group: 'structure', title: 'Cell volume of the run’s structure.', decimals: 3, more: true },
  {
    key: 'a',
    label: '|a₁| (cell vector)',
    unit: 'Å',
    group: 'structure',
    title: 'Length of the first vector of the cell as written (a primitive-vector length, not the conventional lattice constant).',
    decimals: 4,
    more: true,
  },
  {
    key: 'c',
    label: '|a₃| (cell vector)',
    unit: 'Å',
    group: 'structure',
    title: 'Length of the third vector of the cell as written (not the conventional c of a strained film).',
    decimals: 4,
    more: true,
  },
];

/** Column keys of the compact default set; every other column is behind "More columns". */
const COMPACT_KEYS = new Set(['gap', 'deltaGap', 'cbm.nv', 'cbm.dos', 'cbm.cond', 'vbm.nv', 'vbm.dos', 'vbm.cond', 'aConv']);

const EDGE_COLUMNS: CompareColumn[] = [
  { key: 'gap', label: 'Gap', unit: 'eV', group: 'edge', title: 'Fundamental gap (CBM − VBM).', decimals: 4 },
  { key: 'deltaGap', label: 'Δ gap', unit: 'eV', group: 'edge', title: 'Gap minus the reference run’s gap.', decimals: 4 },
  { key: 'directGap', label: 'Direct gap', unit: 'eV', group: 'edge', title: 'Smallest direct gap.', decimals: 4 },
  {
    key: 'cbm.nv',
    label: 'CBM N_v',
    unit: '',
    group: 'edge',
    title: 'Valley degeneracy of the conduction band minimum (size of the star of k).',
    decimals: 0,
  },
  {
    key: 'cbm.dos',
    label: 'CBM m_dos',
    unit: 'mₑ',
    group: 'mass',
    title: 'Density-of-states mass of the CBM valley, N_v^(2/3)(m1 m2 m3)^(1/3).',
    decimals: 3,
  },
  {
    key: 'cbm.cond',
    label: 'CBM m_c',
    unit: 'mₑ',
    group: 'mass',
    title: 'Conductivity mass of the CBM valley, 3/(1/m1 + 1/m2 + 1/m3).',
    decimals: 3,
  },
  { key: 'vbm.nv', label: 'VBM N_v', unit: '', group: 'edge', title: 'Valley degeneracy of the valence band maximum.', decimals: 0 },
  { key: 'vbm.dos', label: 'VBM m_dos', unit: 'mₑ', group: 'mass', title: 'Density-of-states mass at the VBM.', decimals: 3 },
  { key: 'vbm.cond', label: 'VBM m_c', unit: 'mₑ', group: 'mass', title: 'Conductivity mass at the VBM.', decimals: 3 },
];

/** Masses of an extremum keyed by direction: "Γ", or "X·2" for branch 2 (or the second fit towards X). */
export function massKeys(masses: readonly MassFit[]): { key: string; text: string; mass: number }[] {
  const seen = new Map<string, number>();
  return masses.map((m) => {
    const n = (seen.get(m.towards) ?? 0) + 1;
    seen.set(m.towards, n);
    const part = m.branch ?? n;
    const repeated = m.branch !== undefined ? masses.filter((x) => x.towards === m.towards).length > 1 : n > 1;
    return {
      key: repeated || part > 1 ? `${m.towards}·${part}` : m.towards,
      text: repeated || part > 1 ? `→ ${m.towards} (branch ${part})` : `→ ${m.towards}`,
      mass: m.mass,
    };
  });
}

function pushColumn(cols: CompareColumn[], seen: Set<string>, c: CompareColumn): void {
  if (seen.has(c.key)) return;
  seen.add(c.key);
  cols.push(c);
}

function edgeOf(run: ComparedRun, kind: 'cbm' | 'vbm'): ExtremumReport | null {
  const id = kind === 'cbm' ? run.cbmValley : run.vbmValley;
  return id ? (run.valleys[id]?.extremum ?? null) : null;
}

function valuesOf(c: Comparison, run: ComparedRun, input: RunInput): Record<string, number | null> {
  const report = input.report;
  const v: Record<string, number | null> = {};
  // A metal has no gap (not a gap of zero).
  v.gap = run.metal ? null : run.gap_eV;
  v.deltaGap = run.deltaGap_eV;
  v.directGap = report.gap ? report.gap.directGap.eV : null;
  for (const kind of ['cbm', 'vbm'] as const) {
    const e = edgeOf(run, kind);
    v[`${kind}.nv`] = e?.valleyDegeneracy ?? null;
    v[`${kind}.dos`] = e?.dosMass ?? null;
    v[`${kind}.cond`] = e?.conductivityMass ?? null;
    if (e) for (const m of massKeys(e.masses)) v[`${kind}.m.${m.key}`] = m.mass;
  }
  for (const col of c.columns) {
    const entry = run.valleys[col.id];
    if (!entry) continue;
    v[`valley.${col.id}.offset`] = entry.offset_eV * 1000;
    for (const m of massKeys(entry.extremum.masses)) v[`valley.${col.id}.m.${m.key}`] = m.mass;
  }
  const d = run.descriptors;
  v.volume = d?.volume ?? null;
  v.a = d?.a ?? null;
  v.c = d?.c ?? null;
  v.aConv = d ? conventionalCubicA(input.latticeType, d.volume, input.latticePointsPerCell) : null;
  v.volumeStrain = d?.volumeStrain === null || d?.volumeStrain === undefined ? null : d.volumeStrain * 100;
  v.hydrostaticStrain = d?.hydrostaticStrain === null || d?.hydrostaticStrain === undefined ? null : d.hydrostaticStrain * 100;
  v.inPlaneStrain = d?.inPlaneStrain === null || d?.inPlaneStrain === undefined ? null : d.inPlaneStrain * 100;
  return v;
}

/**
 * The trend series of a run: its material, by the composition of its cell ("Si2"), or null when its files give
 * no structure. The lattice type does not split a series: strain lowers it (a cubic crystal strained in its
 * plane is tetragonal), and a strain series must stay one line through zero strain; the legend lists the
 * lattice types a series holds.
 */
export function seriesOf(run: RunInput | null): string | null {
  return run?.composition || null;
}

/**
 * The reference when the user chose none: the first run of the material most runs share (by composition of
 * the cell), so "what changed" compares a material with itself; the first readable run when no run gives a
 * structure. Ties go to the material listed first.
 */
export function defaultReferenceId(entries: readonly CompareEntry[]): string | null {
  const readable = entries.filter((e) => e.run !== null);
  const counts = new Map<string, { n: number; first: string }>();
  for (const e of readable) {
    const m = e.run!.composition;
    if (!m) continue;
    const c = counts.get(m);
    if (c) c.n++;
    else counts.set(m, { n: 1, first: e.id });
  }
  let best: { n: number; first: string } | null = null;
  for (const c of counts.values()) if (!best || c.n > best.n) best = c;
  return best?.first ?? readable[0]?.id ?? null;
}

/** The table for the view. `referenceId`: the row the differences are taken against (default: defaultReferenceId). */
export function buildCompareTable(entries: readonly CompareEntry[], referenceId: string | null, annotationsAsRuns: boolean): CompareTable {
  const readable = entries.filter((e) => e.run !== null);
  const ref = referenceId && readable.some((e) => e.id === referenceId) ? referenceId : defaultReferenceId(entries);
  const c: Comparison = readable.length
    ? compareRuns(
        readable.map((e) => ({ ...e.run!, name: e.id })),
        ref ?? undefined,
      )
    : { reference: '', columns: [], runs: [], events: [] };
  const byId = new Map(c.runs.map((r) => [r.name, r]));
  const reportById = new Map(readable.map((e) => [e.id, e.run!.report]));
  const inputById = new Map(readable.map((e) => [e.id, e.run!]));

  const columns: CompareColumn[] = [];
  const seen = new Set<string>();
  for (const col of EDGE_COLUMNS) pushColumn(columns, seen, col);
  // Directional masses at each run's own edges (the valley may differ run to run: see the CBM column).
  for (const kind of ['cbm', 'vbm'] as const) {
    for (const r of c.runs) {
      const e = edgeOf(r, kind);
      if (!e) continue;
      for (const m of massKeys(e.masses)) {
        pushColumn(columns, seen, {
          key: `${kind}.m.${m.key}`,
          label: `${kind.toUpperCase()} m* ${m.text}`,
          unit: 'mₑ',
          group: 'mass',
          title: `Signed curvature mass at the ${kind.toUpperCase()} along the path ${m.text.replace('→', 'towards')}.`,
          decimals: 3,
        });
      }
    }
  }
  // Every matched valley: its distance from the edge and its masses, the same valley in every run.
  for (const col of c.columns) {
    const where = `${col.side === 'conduction' ? 'conduction' : 'valence'} valley ${col.id} at ${col.where}${col.branch ? ` (branch ${col.branch + 1} there)` : ''}`;
    pushColumn(columns, seen, {
      key: `valley.${col.id}.offset`,
      label: `${col.id} offset`,
      unit: 'meV',
      group: 'valley',
      title: `Energy of the ${where} from the band edge on its side (0 when it is the edge).`,
      decimals: 1,
    });
    for (const r of c.runs) {
      const entry = r.valleys[col.id];
      if (!entry) continue;
      for (const m of massKeys(entry.extremum.masses)) {
        pushColumn(columns, seen, {
          key: `valley.${col.id}.m.${m.key}`,
          label: `${col.id} m* ${m.text}`,
          unit: 'mₑ',
          group: 'valley',
          title: `Signed curvature mass in the ${where}, ${m.text.replace('→', 'towards')}.`,
          decimals: 3,
        });
      }
    }
  }
  for (const col of DESCRIPTOR_COLUMNS) pushColumn(columns, seen, col);

  const rows: CompareRow[] = entries.map((e) => {
    const r = byId.get(e.id);
    return {
      id: e.id,
      name: e.name,
      origin: e.origin,
      isReference: e.id === ref,
      annotations: e.annotations,
      staleReasons: e.staleReasons,
      error: e.error,
      metal: r?.metal ?? null,
      semimetal: reportById.get(e.id)?.semimetal ?? null,
      spinors: reportById.get(e.id)?.spinors ?? false,
      direct: r?.direct ?? null,
      vbm: r?.vbm ?? null,
      cbm: r?.cbm ?? null,
      cbmValley: r?.cbmValley ?? null,
      vbmValley: r?.vbmValley ?? null,
      values: r ? valuesOf(c, r, inputById.get(e.id)!) : {},
      canOverlay: e.canOverlay,
      series: seriesOf(e.run),
      latticeType: e.run?.latticeType ?? null,
    };
  });
  // Columns no run has a number for are left out (e.g. strain with a single run).
  const used = columns
    .filter((col) => rows.some((row) => typeof row.values[col.key] === 'number' && Number.isFinite(row.values[col.key])))
    .map((col) => (COMPACT_KEYS.has(col.key) ? { ...col, more: false } : { ...col, more: true }));
  const cautions = [...COMPARE_CAUTIONS];
  if (entries.some((e) => e.origin === 'annotations' || e.annotations !== 'none')) cautions.push(ANNOTATIONS_CAUTION);
  return {
    reference: ref,
    columns: used,
    descriptorKeys: DESCRIPTOR_COLUMNS.map((d) => d.key).filter((k) => used.some((u) => u.key === k)),
    rows,
    events: eventsAgainst(c, ref, inputById),
    cautions,
    annotationsAsRuns,
  };
}

/**
 * What changed against the reference, for runs of the reference's material; a run of another material gets
 * one sentence saying so instead of valley-by-valley changes that would compare two different crystals.
 */
function eventsAgainst(c: Comparison, ref: string | null, inputs: ReadonlyMap<string, RunInput>): CompareTable['events'] {
  const refSeries = ref ? seriesOf(inputs.get(ref) ?? null) : null;
  const out: CompareTable['events'] = [];
  const told = new Set<string>();
  for (const ev of c.events) {
    if (ev.kind === 'stale') continue;
    const series = seriesOf(inputs.get(ev.run) ?? null);
    if (refSeries && series && series !== refSeries) {
      if (!told.has(ev.run))
        out.push({
          rowId: ev.run,
          kind: 'other-material',
          message: `another material (${series}) than the reference (${refSeries}): its gap and masses are listed, not compared valley by valley`,
        });
      told.add(ev.run);
      continue;
    }
    out.push({ rowId: ev.run, kind: ev.kind, message: ev.message });
  }
  return out;
}

/** Band data of one run for the overlay: path, energies, and the energy it is aligned at (VBM, else Fermi level). */
export function bandRunOf(
  rowId: string,
  title: string,
  run: { bs: BandStructure; report: Report; geometry: PathGeometry },
): CompareBandRun {
  const bs = run.bs;
  const dtype = bs.nk * bs.nBands * bs.nSpin > F64_ENERGY_LIMIT ? 'f32' : 'f64';
  const vbm = run.report.gap?.vbm.eV ?? null;
  const fermi = bs.fermiEnergy ?? (run.report.metal ? run.report.fermi_eV : null);
  return {
    rowId,
    title,
    nk: bs.nk,
    nBands: bs.nBands,
    nSpin: bs.nSpin,
    distance: encodeArray(run.geometry.distance, 'f64'),
    energies: bs.energies.map((e) => encodeArray(e, dtype)),
    ticks: run.geometry.ticks.map((t) => ({ distance: t.distance, label: t.label, kIndex: t.index })),
    segments: run.geometry.segments.map((s) => ({
      start: s.start,
      end: s.end,
      startLabel: s.startLabel,
      endLabel: s.endLabel,
      afterJump: s.afterJump,
    })),
    align_eV: vbm ?? fermi,
    alignedAt: vbm !== null ? 'vbm' : fermi !== null ? 'fermi' : 'none',
    distanceUnits: run.geometry.units,
  };
}
