/**
 * The band view's data, built from a loaded run: compact typed arrays plus the path, the report and marks
 * for the extrema located on the arrays. Pure; no `vscode`.
 */
import type { BandStructure, Report, Vec3 } from '../core/model';
import type { PathGeometry } from '../core/lattice/kpath';
import { FIT_METHODS } from '../core/analysis/methods';
import { encodeArray, type BandData, type EnergyReference, type ExtremumMark, type ArrayDType, type SetAsideMark } from '../protocol';
import type { AnalysisSettings } from '../core/analysis/analyze';

/** Above this many energies (all spins) they travel as 32-bit floats (7 significant digits: µeV near 0–50 eV). */
export const F64_ENERGY_LIMIT = 4_000_000;

/** The k-point closest to `k` (fractional coordinates), preferring exact matches. */
export function nearestKIndex(bs: BandStructure, k: Vec3): number {
  let best = 0;
  let bestD = Infinity;
  for (let i = 0; i < bs.nk; i++) {
    const d = Math.hypot(bs.kpoints[3 * i]! - k[0], bs.kpoints[3 * i + 1]! - k[1], bs.kpoints[3 * i + 2]! - k[2]);
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}

export function extremumMarks(bs: BandStructure, report: Report): ExtremumMark[] {
  return report.extrema.map((x, reportIndex) => ({
    kind: x.kind,
    spin: x.spin,
    kIndex: nearestKIndex(bs, x.k),
    band0: x.band - 1,
    eV: x.eV,
    label: x.label,
    reportIndex,
  }));
}

/** Same k modulo a reciprocal lattice vector (fractional coordinates differ by integers). */
function sameKModG(bs: BandStructure, i: number, k: Vec3): boolean {
  for (let c = 0; c < 3; c++) {
    const d = bs.kpoints[3 * i + c]! - k[c]!;
    if (Math.abs(d - Math.round(d)) > 1e-6) return false;
  }
  return true;
}

/** The report's set-aside candidates, at every place the path visits their k. */
export function setAsideMarks(bs: BandStructure, report: Report): SetAsideMark[] {
  const out: SetAsideMark[] = [];
  for (const x of report.rejected ?? []) {
    for (let i = 0; i < bs.nk; i++) {
      if (sameKModG(bs, i, x.k)) out.push({ spin: x.spin, kIndex: i, band0: x.band - 1, reason: x.reason, detail: x.detail });
    }
  }
  return out;
}

export function buildBandData(
  bs: BandStructure,
  report: Report,
  geometry: PathGeometry,
  title: string,
  settings: AnalysisSettings,
  energyReference: EnergyReference,
): BandData {
  const total = bs.nk * bs.nBands * bs.nSpin;
  const dtype: ArrayDType = total > F64_ENERGY_LIMIT ? 'f32' : 'f64';
  // With edges unknown, "VBM = 0" cannot be honoured: fall back to the Fermi level, then raw.
  let ref = energyReference;
  // A metal's Fermi level: as written, or as the analysis estimated it (its reason says so).
  const fermi = bs.fermiEnergy ?? (report.metal ? report.fermi_eV : null);
  if (ref === 'vbm' && !report.gap) ref = fermi !== null ? 'fermi' : 'raw';
  if (ref === 'fermi' && fermi === null) ref = 'raw';
  return {
    title,
    format: bs.source.format,
    nk: bs.nk,
    nBands: bs.nBands,
    nSpin: bs.nSpin,
    distance: encodeArray(geometry.distance, 'f64'),
    distanceUnits: geometry.units,
    kpoints: encodeArray(bs.kpoints, 'f64'),
    cartesian: geometry.cartesian ? encodeArray(geometry.cartesian, 'f64') : null,
    energies: bs.energies.map((e) => encodeArray(e, dtype)),
    ticks: geometry.ticks.map((t) => ({ distance: t.distance, label: t.label, kIndex: t.index })),
    segments: geometry.segments.map((s) => ({
      start: s.start,
      end: s.end,
      startLabel: s.startLabel,
      endLabel: s.endLabel,
      afterJump: s.afterJump,
    })),
    fermiEnergy: fermi,
    vbm_eV: report.gap ? report.gap.vbm.eV : null,
    cbm_eV: report.gap ? report.gap.cbm.eV : null,
    report,
    marks: extremumMarks(bs, report),
    setAside: setAsideMarks(bs, report),
    defaults: {
      window_meV: settings.window_meV,
      method: settings.method,
      methods: [...FIT_METHODS],
      energyReference: ref,
      range_eV: settings.range_eV,
    },
    partial: bs.partial,
  };
}
