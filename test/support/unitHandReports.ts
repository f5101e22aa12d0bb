/** Hand-made analysis reports for the comparison tests (numbers chosen for the arithmetic, not physical claims). */
import { compareRuns, type Comparison } from '../../src/core/compare/compareRuns';
import type { ExtremumReport, GapReport, Report, Vec3 } from '../../src/core/model';

/** One directional mass: towards which point, the signed mass (m_e), and optionally the branch of a degenerate edge. */
export type HandMass = [towards: string, mass: number, branch?: number];

export interface HandExtremum {
  kind: ExtremumReport['kind'];
  band: number;
  k: Vec3;
  eV: number;
  label: string | null;
  masses: HandMass[];
  offset_eV?: number;
  degenerateBands?: number;
  valleyDegeneracy?: number | null;
}

export function handExtremum(e: HandExtremum): ExtremumReport {
  return {
    kind: e.kind,
    band: e.band,
    spin: 0,
    k: e.k,
    eV: e.eV,
    label: e.label,
    offset_eV: e.offset_eV ?? 0,
    degenerateBands: e.degenerateBands ?? 1,
    valleyDegeneracy: e.valleyDegeneracy === undefined ? null : e.valleyDegeneracy,
    masses: e.masses.map(([towards, mass, branch]) => ({
      towards,
      direction: [1, 0, 0],
      mass,
      stderr: 0.001,
      points: 7,
      window_meV: 25,
      method: 'parabola',
      determined: true,
      ...(branch !== undefined ? { branch } : {}),
    })),
    tensor: null,
    dosMass: null,
    conductivityMass: null,
    warnings: [],
  };
}

/**
 * A semiconductor report around the given extrema (one 'vbm' and one 'cbm' among them). The gap is direct with
 * the direct gap at Γ equal to CBM − VBM unless `directGap_eV` is given (then it is indirect).
 */
export function handReport(extrema: ExtremumReport[], directGap_eV?: number): Report {
  const vbm = extrema.find((e) => e.kind === 'vbm')!;
  const cbm = extrema.find((e) => e.kind === 'cbm')!;
  const gap: GapReport = {
    eV: cbm.eV - vbm.eV,
    direct: directGap_eV === undefined,
    vbm: { band: vbm.band, spin: 0, k: vbm.k, eV: vbm.eV, label: vbm.label },
    cbm: { band: cbm.band, spin: 0, k: cbm.k, eV: cbm.eV, label: cbm.label },
    directGap: { eV: directGap_eV ?? cbm.eV - vbm.eV, k: [0, 0, 0] },
  };
  return {
    file: 'x',
    format: 'test',
    nk: 1,
    nbands: 8,
    nspin: 1,
    electrons: 8,
    metal: false,
    semimetal: false,
    fermi_eV: null,
    classificationReason: 'test report',
    spinors: false,
    gap,
    extrema,
    warnings: [],
    cautions: [],
  };
}

/** Compare run 'b' against reference run 'a', neither with a lattice. */
export function compareTwo(a: Report, b: Report): Comparison {
  return compareRuns([
    { name: 'a', report: a, lattice: null },
    { name: 'b', report: b, lattice: null },
  ]);
}
