/**
 * The whole analysis of one band structure: occupations, edges, gap, extrema with masses. Returns the
 * Report the CLI prints and the editor shows. Pure: no I/O.
 */
import type { BandStructure, Report } from '../model';
import { occupationRule } from './occupation';
import { bandEdges, gapReport } from './gap';
import { standardCautions } from './cautions';
import { analyseExtrema } from './massEngine';

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
    gap: null,
    extrema: [],
    warnings,
    cautions: [],
  };
  const occ = occupationRule(bs);
  if (!occ) {
    warnings.push('Neither occupations, an electron count nor a Fermi energy is known: band edges cannot be placed.');
  } else {
    warnings.push(...occ.warnings);
    const edges = bandEdges(bs, occ);
    report.metal = edges.metal;
    const all = bs.nSpin === 2 ? [0, 1] : [0];
    report.gap = gapReport(bs, occ, edges.vbm, edges.cbm, edges.metal, all);
    if (bs.nSpin === 2) {
      report.spinGaps = edges.spins.map((e, i) => gapReport(bs, occ, e.vbm, e.cbm, e.metal, [i]));
    }
    if (occ.fractionalFilling) warnings.push(`${bs.electrons} electrons do not fill a whole number of bands: the system is metallic (or the count is wrong).`);
    if (report.gap) analyseExtrema(bs, report, s, { occ, edges });
  }
  if (bs.partial) warnings.push('Partial data: the file is incomplete, so these results are provisional.');
  report.cautions = standardCautions(bs, report);
  return report;
}
