/**
 * The whole analysis of one band structure: occupations, edges, gap, extrema with masses. Returns the
 * Report the CLI prints and the editor shows. Pure: no I/O.
 */
import type { BandStructure, Report, Vec3 } from '../model';
import { kpointAt } from '../model';
import { occupationRule } from './occupation';
import { bandEdges, gapReport } from './gap';
import { standardCautions } from './cautions';
import { classifyConduction } from './conductionClass';
import { localRun } from './localRun';
import { analyzeExtrema, analyzePocketExtrema } from './massEngine';
import { symmetryContext } from './valleyCount';
import { valleyRepresentative } from '../lattice/valleyIdentity';
import { analyzeMeshRun, mayBeMeshRun, meshRunCautions } from './meshRunAnalysis';
import { meshRunNotUsed } from './declaredMesh';

export interface AnalysisSettings {
  /** Energy window of the parabola fit, meV. */
  window_meV: number;
  /** Fit method: one of FIT_METHODS (methods.ts): 'parabola' | 'central-2' | 'central-4' | 'poly4' | 'kane'; fd3/fd5 accepted as aliases. */
  method: string;
  /** Range below the VBM / above the CBM in which secondary extrema are reported, eV. */
  range_eV: number;
  /** Bands within this energy of an edge count as degenerate with it, meV. */
  degeneracy_meV: number;
}

export const DEFAULT_SETTINGS: AnalysisSettings = {
  window_meV: 25,
  method: 'parabola',
  range_eV: 0.5,
  degeneracy_meV: 1,
};

export function analyzeBandStructure(bs: BandStructure, settings: Partial<AnalysisSettings> = {}): Report {
  const s: AnalysisSettings = { ...DEFAULT_SETTINGS, ...settings };
  const warnings = bs.warnings.map((w) => w.message);
  const report: Report = {
    file: bs.source.file,
    format: bs.source.format,
    nk: bs.nk,
    nbands: bs.nBands,
    nspin: bs.nSpin,
    electrons: bs.electrons,
    metal: null,
    semimetal: null,
    fermi_eV: bs.fermiEnergy,
    classificationReason: '',
    spinors: bs.spinorbit,
    gap: null,
    extrema: [],
    warnings,
    cautions: [],
  };
  const occ = occupationRule(bs);
  const cls = classifyConduction(bs, occ);
  report.metal = cls.metal;
  report.semimetal = cls.semimetal;
  report.fermi_eV = cls.fermi_eV;
  report.classificationReason = cls.reason;
  if (cls.metal) report.crossingBands = [...new Set(cls.spins.flatMap((v) => v.crossing.map((b) => b + 1)))].sort((a, b) => a - b);
  if (bs.nSpin === 2) {
    report.spinChannels = cls.spins.map((v) => ({
      spin: v.spin,
      metal: v.metal,
      semimetal: v.semimetal,
      fermi_eV: bs.fermiEnergies?.[v.spin] ?? cls.fermi_eV,
      classificationReason: v.reason,
      crossingBands: v.crossing.map((b) => b + 1),
    }));
  }
  warnings.push(...cls.warnings);
  if (!occ) {
    warnings.push('Neither occupations, an electron count nor a Fermi energy is known: band edges cannot be placed.');
  } else {
    // A metal's count warning is the classification itself.
    warnings.push(...(cls.metal ? occ.warnings.filter((w) => !/^Occupations fill/.test(w)) : occ.warnings));
    const edges = bandEdges(bs, occ);
    const metal = cls.metal === true;
    edges.metal = metal;
    edges.spins.forEach((e, i) => (e.metal = cls.spins[i]?.metal === true));
    const all = bs.nSpin === 2 ? [0, 1] : [0];
    const gap = gapReport(bs, occ, edges.vbm, edges.cbm, metal, all);
    report.gap = gap;
    if (bs.nSpin === 2) {
      report.spinGaps = edges.spins.map((e, i) => gapReport(bs, occ, e.vbm, e.cbm, e.metal, [i]));
    }
    const local = localRun(bs);
    // A mesh run: edges and masses from the interpolated bands; otherwise (or when it cannot be interpolated) the points as they are.
    const mesh = gap !== null && mayBeMeshRun(bs, local !== null);
    const meshRefusal = mesh ? analyzeMeshRun(bs, report, s, { occ, edges }) : null;
    if (gap && (!mesh || meshRefusal !== null)) {
      const why = meshRefusal ? meshRunNotUsed(bs, meshRefusal) : null;
      if (why) report.warnings.push(why);
      analyzeExtrema(bs, report, s, { occ, edges });
    } else if (metal && cls.fermi_eV !== null) {
      const crossing = cls.spins.flatMap((v) => v.crossing.map((band) => ({ spin: v.spin, band })));
      analyzePocketExtrema(bs, report, s, crossing, cls.fermi_eV);
    }
    let centreK = local ? kpointAt(bs, local.centre) : null;
    if (local) {
      // The patch's own edges are not the crystal's: keep only the extrema at its centre.
      const centres = local.centres.map((i) => kpointAt(bs, i));
      const atCentre = (k: readonly number[]): Vec3 | undefined => centres.find((c) => k.every((x, j) => Math.abs(x - c[j]!) < 1e-7));
      report.extrema = report.extrema.filter((e) => atCentre(e.k) !== undefined);
      if (report.extrema[0]) centreK = atCentre(report.extrema[0].k)!;
    }
    if (local && gap && centreK) {
      report.gap = null;
      if (report.spinGaps) report.spinGaps = report.spinGaps.map(() => null);
      report.gapReason = `The k-points cover only a small neighbourhood of ${centreK.map((x) => Number(x.toFixed(4))).join(', ')} (within ${(local.extent * 100).toFixed(0)} % of the shortest reciprocal vector): a gap needs the whole zone, so none is given, and only the extremum at the centre is reported.`;
    }
    if (report.extrema.length) {
      // Each extremum's valley: one chosen member of the star of its k (the identity annotations use).
      const sym = symmetryContext(bs).sym;
      for (const x of report.extrema) x.valley = valleyRepresentative(x.k, sym ? sym.reciprocalPointGroup : null);
    }
  }
  if (bs.partial) warnings.push('Partial data: the file is incomplete, so these results are provisional.');
  report.cautions = [...standardCautions(bs, report), ...meshRunCautions(report)];
  if (bs.bandNumberOffset) renumberBands(report, bs.bandNumberOffset);
  return report;
}

/** Number bands as the file does (a file holding bands 3–6 reports band 3 for its first). */
function renumberBands(r: Report, offset: number): void {
  const shift = (p: { band: number }): void => {
    p.band += offset;
  };
  for (const g of [r.gap, ...(r.spinGaps ?? [])]) {
    if (g) {
      shift(g.vbm);
      shift(g.cbm);
    }
  }
  r.extrema.forEach(shift);
  if (r.crossingBands) r.crossingBands = r.crossingBands.map((b) => b + offset);
  for (const c of r.spinChannels ?? []) c.crossingBands = c.crossingBands.map((b) => b + offset);
}
