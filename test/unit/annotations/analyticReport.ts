import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import type { Report } from '../../../src/core/model';
import { TINY } from './tinyRun';

/**
 * A report for the cosine tight-binding model of tinyRun.ts with its exact masses m* = ħ²/(2 t a²)
 * (analytic model; ħ²/m_e from CODATA 2018 via units.ts), written the way the analysis reports them.
 */
export function analyticReport(): Report {
  const mc = HBAR2_OVER_ME_EV_A2 / (2 * TINY.tConduction_eV * TINY.a ** 2);
  const mv = -HBAR2_OVER_ME_EV_A2 / (2 * TINY.tValence_eV * TINY.a ** 2);
  const at = (band: number, eV: number) => ({ band, spin: 0 as const, k: [0, 0, 0] as [number, number, number], eV, label: 'Γ' });
  const fit = (mass: number) => ({
    towards: 'X',
    direction: [1, 0, 0] as [number, number, number],
    mass,
    stderr: 0.0004,
    points: 7,
    window_meV: 25,
    method: 'parabola',
    residual_meV: 0.01,
    determined: true,
  });
  const extremum = (kind: 'vbm' | 'cbm', band: number, eV: number, mass: number) => ({
    ...at(band, eV),
    kind,
    offset_eV: 0,
    degenerateBands: 1,
    valleyDegeneracy: 1,
    masses: [fit(mass)],
    tensor: null,
    dosMass: Math.abs(mass),
    conductivityMass: Math.abs(mass),
    warnings: [],
  });
  return {
    file: 'run/EIGENVAL',
    format: 'vasp-eigenval',
    nk: TINY.nk,
    nbands: TINY.nBands,
    nspin: 1,
    electrons: TINY.electrons,
    metal: false,
    semimetal: false,
    fermi_eV: null,
    classificationReason: '',
    spinors: false,
    gap: { eV: TINY.gap_eV, direct: true, vbm: at(1, 0), cbm: at(2, TINY.gap_eV), directGap: { eV: TINY.gap_eV, k: [0, 0, 0] } },
    extrema: [extremum('cbm', 2, TINY.gap_eV, mc), extremum('vbm', 1, 0, mv)],
    warnings: [],
    cautions: ['Semilocal DFT (LDA/GGA) usually underestimates band gaps.'],
  };
}
