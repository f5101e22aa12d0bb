/**
 * A fresh annotations document from an analysis Report: one entry per extremum the report holds (and, when
 * the report has no extrema of a band-edge kind, entries for the VBM and CBM of its gap), no notes yet, every
 * entry 'unreviewed'. Merging with what a reviewer already wrote is mergeAnnotations' job.
 */
import type { BandPoint, BandSource, ExtremumReport, GapReport, MassFit, MassTensor, Report, Vec3 } from '../model';
import type { AnalysisSettings } from '../analysis/analyze';
import {
  ANNOTATIONS_LAYOUT_VERSION,
  emptyExtra,
  entryId,
  placeKey,
  type AnnotatedEntry,
  type AnnotatedGap,
  type AnnotatedMass,
  type AnnotatedPoint,
  type AnnotatedSettings,
  type AnnotatedSource,
  type AnnotatedTensor,
  type AnnotationsDoc,
} from './annotationsModel';
import { sortEntries } from './serializeAnnotations';
import { mergeAnnotations } from './mergeAnnotations';
import { valleyRepresentative } from '../lattice/valleyIdentity';
import { methodId } from '../analysis/methods';
import type { FitChoice } from './chosenFits';

export interface RecordedSettings extends AnalysisSettings {
  /** The run was read as spin-orbit because the user asked (`--soc`), not because its files say so. */
  forceSpinorbit?: boolean;
  /** alat (Å) the user gave for a layout that needs it. */
  alat_angstrom?: number | null;
  /** Structure file the user gave, relative to the annotations file's folder. */
  structureFile?: string | null;
}

export interface BuildOptions {
  /** Version of the program writing the file. */
  toolVersion: string;
  /** The document already beside the data, if any: the result is then merged with it (mergeAnnotations). */
  existing?: AnnotationsDoc | null;
  /** The fits a reviewer chose (withChosenFits), recorded on their entries as `fit`. */
  fits?: ReadonlyMap<string, FitChoice>;
}

function splitPath(p: string): string[] {
  return p
    .replace(/\\/g, '/')
    .split('/')
    .filter((s) => s !== '' && s !== '.');
}

/**
 * `path` relative to the folder `dir` ('/' separators). Both are as the caller gave them (both relative to
 * the same working folder, or both absolute).
 */
export function relativePath(dir: string, path: string): string {
  const absolute = /^([a-zA-Z]:)?[\\/]/.test(path);
  const d = splitPath(dir);
  const p = splitPath(path);
  if (/^([a-zA-Z]:)?[\\/]/.test(dir) !== absolute) return p.join('/');
  let i = 0;
  while (i < d.length && i < p.length && d[i] === p[i]) i++;
  return [...d.slice(i).map(() => '..'), ...p.slice(i)].join('/');
}

function folderOf(path: string): string {
  const p = path.replace(/[\\/]+$/, '');
  const i = Math.max(p.lastIndexOf('/'), p.lastIndexOf('\\'));
  return i < 0 ? '.' : i === 0 ? '/' : p.slice(0, i);
}

/** The source files, with paths relative to the folder of the data file (where the annotations live). */
export function annotatedSources(source: BandSource): AnnotatedSource[] {
  const dir = folderOf(source.file);
  return source.files.map((f) => ({ path: relativePath(dir, f.path), role: f.role, sha256: f.sha256, extra: emptyExtra() }));
}

/** Messages may name files by the path the caller used; in the file they are named relative to it. */
function withoutFolder(dir: string, text: string): string {
  if (dir === '.' || dir === '') return text;
  const prefix = dir.endsWith('/') || dir.endsWith('\\') ? dir : `${dir}/`;
  return text.split(prefix).join('');
}

function point(p: BandPoint): AnnotatedPoint {
  return { band: p.band, spin: p.spin, k: [p.k[0], p.k[1], p.k[2]], energy_eV: p.eV, label: p.label };
}

function gap(g: GapReport | null): AnnotatedGap | null {
  if (!g) return null;
  return {
    eV: g.eV,
    direct: g.direct,
    vbm: point(g.vbm),
    cbm: point(g.cbm),
    directGap: { eV: g.directGap.eV, k: [g.directGap.k[0], g.directGap.k[1], g.directGap.k[2]] },
    extra: emptyExtra(),
  };
}

const finiteOrNull = (x: number | null | undefined): number | null => (x === null || x === undefined || !Number.isFinite(x) ? null : x);

function mass(m: MassFit): AnnotatedMass {
  return {
    towards: m.towards,
    direction: [m.direction[0], m.direction[1], m.direction[2]].map((x) => (Number.isFinite(x) ? x : 0)) as Vec3,
    mass: finiteOrNull(m.mass),
    stderr: finiteOrNull(m.stderr),
    points: m.points,
    window_meV: m.window_meV,
    method: m.method,
    alpha_per_eV: finiteOrNull(m.alpha_per_eV),
    residual_meV: finiteOrNull(m.residual_meV),
    branch: m.branch ?? null,
    determined: m.determined,
    warnings: [...(m.warnings ?? []), ...(!m.determined && m.undeterminedReason ? [`Undetermined: ${m.undeterminedReason}.`] : [])],
    extra: emptyExtra(),
  };
}

function tensor(t: MassTensor | null): AnnotatedTensor | null {
  // A tensor with a non-finite principal mass (a flat direction) has no written form; the entry says why.
  if (!t || !t.principal.every(Number.isFinite) || !t.axes.every((row) => row.every(Number.isFinite))) return null;
  return {
    principal: [t.principal[0], t.principal[1], t.principal[2]],
    stderr: t.stderr && t.stderr.every(Number.isFinite) ? [t.stderr[0], t.stderr[1], t.stderr[2]] : null,
    axes: [
      [t.axes[0][0], t.axes[0][1], t.axes[0][2]],
      [t.axes[1][0], t.axes[1][1], t.axes[1][2]],
      [t.axes[2][0], t.axes[2][1], t.axes[2][2]],
    ],
    method: t.method,
    points: finiteOrNull(t.points),
    residual_meV: finiteOrNull(t.residual_meV),
    extra: emptyExtra(),
  };
}

/** Where the edges are, per spin channel, to count bands from them. */
interface EdgeBands {
  spinPolarised: boolean;
  /** 1-based band of the VBM and CBM of each spin channel (index 0, 1), or of the run. */
  vbm: (number | null)[];
  cbm: (number | null)[];
}

function edgeBandsOf(report: Report): EdgeBands {
  const spinPolarised = report.nspin === 2;
  const vbm: (number | null)[] = [];
  const cbm: (number | null)[] = [];
  for (const s of [0, 1]) {
    // A channel's own edges when the report gives them; the run's edges otherwise.
    const g = report.spinGaps?.[s] ?? report.gap;
    vbm.push(g ? g.vbm.band : null);
    cbm.push(g ? g.cbm.band : null);
  }
  return { spinPolarised, vbm, cbm };
}

/** Band counted from the edge on its side (1 = the edge band), or null when there is no edge to count from. */
export function bandFromEdge(kind: AnnotatedEntry['kind'], band: number, vbmBand: number | null, cbmBand: number | null): number | null {
  const valence = kind === 'vbm' || kind === 'peak';
  const n = valence ? (vbmBand === null ? null : vbmBand - band + 1) : cbmBand === null ? null : band - cbmBand + 1;
  return n !== null && n >= 1 ? n : null;
}

function blankEntry(p: BandPoint, kind: AnnotatedEntry['kind'], edges: EdgeBands, valley?: Vec3): AnnotatedEntry {
  const e: AnnotatedEntry = {
    id: '',
    status: 'unreviewed',
    note: '',
    found: true,
    kind,
    spin: p.spin,
    spinPolarised: edges.spinPolarised,
    band: p.band,
    edgeBand: bandFromEdge(kind, p.band, edges.vbm[p.spin] ?? null, edges.cbm[p.spin] ?? null),
    k: [p.k[0], p.k[1], p.k[2]],
    valley: valley ? [valley[0], valley[1], valley[2]] : valleyRepresentative(p.k, null),
    label: p.label,
    energy_eV: p.eV,
    offset_eV: null,
    degenerateBands: null,
    valleyDegeneracy: null,
    masses: [],
    tensor: null,
    dosMass: null,
    conductivityMass: null,
    warnings: [],
    fit: null,
    extra: emptyExtra(),
  };
  e.id = entryId(e);
  return e;
}

function entryFromExtremum(x: ExtremumReport, edges: EdgeBands): AnnotatedEntry {
  const e = blankEntry(x, x.kind, edges, x.valley);
  e.offset_eV = finiteOrNull(x.offset_eV);
  e.degenerateBands = x.degenerateBands;
  e.valleyDegeneracy = x.valleyDegeneracy;
  e.masses = x.masses.map(mass);
  e.tensor = tensor(x.tensor);
  if (x.tensor && !e.tensor) e.warnings.push('The mass tensor has a non-finite principal mass (a flat direction) and is not recorded.');
  e.dosMass = finiteOrNull(x.dosMass);
  e.conductivityMass = finiteOrNull(x.conductivityMass);
  e.warnings = [...x.warnings, ...e.warnings];
  return e;
}

/** The entries a report gives, in file order, without notes; chosen fits carry their settings. */
export function entriesFromReport(report: Report, fits?: ReadonlyMap<string, FitChoice>): AnnotatedEntry[] {
  const out = new Map<string, AnnotatedEntry>();
  const edges = edgeBandsOf(report);
  for (const x of report.extrema) {
    const e = entryFromExtremum(x, edges);
    const f = fits?.get(placeKey(x));
    if (f) e.fit = { window_meV: f.window_meV, method: f.method, extra: emptyExtra() };
    if (!out.has(e.id)) out.set(e.id, e);
  }
  if (report.gap) {
    // With no extremum of a band-edge kind in the report, the edges of the gap are still worth an entry.
    for (const [kind, p] of [
      ['vbm', report.gap.vbm],
      ['cbm', report.gap.cbm],
    ] as const) {
      if (report.extrema.some((x) => x.kind === kind)) continue;
      // The same valley member as an extremum at this k would carry, when the report has one there.
      const twin = report.extrema.find((x) => x.valley && x.k.every((v, i) => v === p.k[i]));
      const e = blankEntry(p, kind, edges, twin?.valley);
      e.offset_eV = 0;
      if (!out.has(e.id)) out.set(e.id, e);
    }
  }
  return sortEntries([...out.values()]);
}

export function recordedSettings(s: RecordedSettings): AnnotatedSettings {
  return {
    window_meV: s.window_meV,
    method: s.method,
    range_eV: s.range_eV,
    degeneracy_meV: s.degeneracy_meV,
    forceSpinorbit: s.forceSpinorbit ?? false,
    alat_angstrom: s.alat_angstrom ?? null,
    structureFile: s.structureFile ?? null,
    extra: emptyExtra(),
  };
}

/** The analysis settings a document records, in the shape analyzeBandStructure takes. */
export function analysisSettingsOf(doc: AnnotationsDoc): AnalysisSettings {
  const s = doc.settings;
  // Earlier method names (fd3, fd5) are read as today's (central-2, central-4).
  return { window_meV: s.window_meV, method: methodId(s.method) ?? s.method, range_eV: s.range_eV, degeneracy_meV: s.degeneracy_meV };
}

/**
 * The annotations document for a report. With `options.existing`, the fresh numbers are merged into it:
 * every note, status and hand-added field kept, entries no longer found kept as `found: false`.
 */
export function buildAnnotations(report: Report, source: BandSource, settings: RecordedSettings, options: BuildOptions): AnnotationsDoc {
  const dir = folderOf(source.file);
  const fresh: AnnotationsDoc = {
    layoutVersion: ANNOTATIONS_LAYOUT_VERSION,
    spinPolarised: report.nspin === 2,
    toolVersion: options.toolVersion,
    format: source.format,
    sources: annotatedSources(source),
    settings: recordedSettings(settings),
    metal: report.metal,
    gap: gap(report.gap),
    note: '',
    entries: entriesFromReport(report, options.fits),
    warnings: report.warnings.map((w) => withoutFolder(dir, w)),
    cautions: [...report.cautions],
    extra: emptyExtra(),
  };
  return options.existing ? mergeAnnotations(options.existing, fresh) : fresh;
}
