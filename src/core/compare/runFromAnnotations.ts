/**
 * A run for the comparison taken from an annotations file (`*.valleys.json`) instead of a fresh analysis:
 * the gap, the extrema still found, their directional masses with provenance, tensors, N_v and averaged
 * masses, as the reviewer saved them. The result is report-like: fields an annotations file does not keep
 * (k-point and band counts, electron count) are 0 or null and are never shown as if known.
 *
 * Staleness: the run is `stale` when a recorded source file holds other bytes now (SHA-256), is missing, or
 * cannot be checked; the caller hashes the files (the core reads none) and passes what it found.
 */
import type { ExtremumReport, GapReport, Mat3, MassFit, MassTensor, Report } from '../model';
import type { AnnotatedEntry, AnnotatedGap, AnnotatedMass, AnnotatedTensor, AnnotationsDoc } from '../annotations/annotationsModel';
import { compareSources } from '../annotations/compareAnnotations';
import type { CurrentSource } from '../annotations/checkAnnotations';
import type { RunInput } from './compareRuns';

export interface AnnotationsRunOptions {
  /** The name of the run in the comparison (usually the annotations file's path). */
  name: string;
  /**
   * The recorded sources as they are now: path (relative to the annotations file's folder, as recorded) and
   * the SHA-256 of the bytes now. A recorded source left out is missing. Null: not checked (the run is then
   * stale, since nothing vouches for its numbers).
   */
  currentSources: readonly CurrentSource[] | null;
  /** Real-space lattice rows (Å) of the run's structure, when the caller could read it. */
  lattice?: Mat3 | null;
  /** Real-space integer rotations of the crystal, when known (valleys are then matched up to symmetry). */
  rotations?: Mat3[] | null;
}

export interface AnnotationsRun {
  run: RunInput;
  /** Sentences saying why the run is stale (empty when its sources are unchanged). */
  staleReasons: string[];
}

/** Why an annotations file no longer vouches for its numbers: one sentence per changed, missing or added source. */
export function annotationsStaleness(doc: AnnotationsDoc, currentSources: readonly CurrentSource[] | null): string[] {
  if (currentSources === null) return ['the source files were not checked against the hashes recorded in the annotations'];
  // Only the recorded sources are compared: a file that was never recorded is not a reason here.
  const recorded = new Set(doc.sources.map((s) => s.path));
  return compareSources(
    doc.sources,
    currentSources.filter((s) => recorded.has(s.path)),
  ).map((c) => c.message);
}

function gapReport(g: AnnotatedGap): GapReport {
  return {
    eV: g.eV,
    direct: g.direct,
    vbm: { band: g.vbm.band, spin: g.vbm.spin, k: g.vbm.k, eV: g.vbm.energy_eV, label: g.vbm.label },
    cbm: { band: g.cbm.band, spin: g.cbm.spin, k: g.cbm.k, eV: g.cbm.energy_eV, label: g.cbm.label },
    directGap: { eV: g.directGap.eV, k: g.directGap.k },
  };
}

/** A directional mass as the report carries it; null when the fit gave no finite mass. */
function massFit(m: AnnotatedMass): MassFit | null {
  if (m.mass === null || !Number.isFinite(m.mass)) return null;
  const out: MassFit = {
    towards: m.towards,
    direction: m.direction,
    mass: m.mass,
    // The file may leave the standard error out; NaN says "not known" (JSON output writes it as null).
    stderr: m.stderr ?? Number.NaN,
    points: m.points,
    window_meV: m.window_meV,
    method: m.method,
    // Files written before `determined` was recorded: taken as quotable, as they were then.
    determined: m.determined ?? true,
  };
  if (m.alpha_per_eV !== null) out.alpha_per_eV = m.alpha_per_eV;
  if (m.residual_meV !== null) out.residual_meV = m.residual_meV;
  if (m.branch !== null) out.branch = m.branch;
  if (m.warnings.length) out.warnings = [...m.warnings];
  return out;
}

function massTensor(t: AnnotatedTensor): MassTensor {
  const out: MassTensor = { principal: t.principal, axes: t.axes, method: t.method };
  if (t.points !== null) out.points = t.points;
  if (t.residual_meV !== null) out.residual_meV = t.residual_meV;
  if (t.stderr !== null) out.stderr = t.stderr;
  return out;
}

/** Offset from the band edge on the entry's side, from the file or, when left out, from the gap's edges. */
function offsetOf(e: AnnotatedEntry, gap: AnnotatedGap | null): number {
  if (e.offset_eV !== null) return e.offset_eV;
  if (e.kind === 'vbm' || e.kind === 'cbm') return 0;
  if (!gap) return 0;
  return e.kind === 'valley' ? e.energy_eV - gap.cbm.energy_eV : gap.vbm.energy_eV - e.energy_eV;
}

function extremum(e: AnnotatedEntry, gap: AnnotatedGap | null): ExtremumReport {
  return {
    kind: e.kind,
    band: e.band,
    spin: e.spin,
    k: e.k,
    eV: e.energy_eV,
    label: e.label,
    offset_eV: offsetOf(e, gap),
    degenerateBands: e.degenerateBands ?? 1,
    valleyDegeneracy: e.valleyDegeneracy,
    valley: e.valley,
    masses: e.masses.map(massFit).filter((m): m is MassFit => m !== null),
    tensor: e.tensor ? massTensor(e.tensor) : null,
    dosMass: e.dosMass,
    conductivityMass: e.conductivityMass,
    warnings: [...e.warnings],
  };
}

/** The report-like view of an annotations document (entries the analysis no longer found are left out). */
export function reportFromAnnotations(doc: AnnotationsDoc, file: string): Report {
  const found = doc.entries.filter((e) => e.found);
  const nspin = doc.spinPolarised || doc.entries.some((e) => e.spin === 1) || doc.gap?.vbm.spin === 1 || doc.gap?.cbm.spin === 1 ? 2 : 1;
  return {
    file,
    format: doc.format,
    // Not kept in an annotations file.
    nk: 0,
    nbands: 0,
    nspin,
    electrons: null,
    metal: doc.metal,
    // Not kept in an annotations file.
    semimetal: null,
    fermi_eV: null,
    classificationReason: '',
    spinors: false,
    gap: doc.gap ? gapReport(doc.gap) : null,
    extrema: found.map((e) => extremum(e, doc.gap)),
    warnings: [...doc.warnings],
    cautions: [...doc.cautions],
  };
}

/** A comparison input from an annotations document, flagged stale when its sources changed. */
export function runFromAnnotations(doc: AnnotationsDoc, options: AnnotationsRunOptions): AnnotationsRun {
  const staleReasons = annotationsStaleness(doc, options.currentSources);
  return {
    run: {
      name: options.name,
      report: reportFromAnnotations(doc, options.name),
      lattice: options.lattice ?? null,
      rotations: options.rotations ?? null,
      stale: staleReasons.length > 0,
      origin: 'annotations',
    },
    staleReasons,
  };
}
