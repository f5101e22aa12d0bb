import assert from 'node:assert/strict';
import { create, all } from 'mathjs';
import {
  BOHR_ANGSTROM,
  HARTREE_EV,
  HBAR2_OVER_ME_EV_A2,
  RYDBERG_EV,
  curvatureToMass,
  massToCurvature,
  thermalEnergyEv,
} from '../../../src/core/units';

const math = create(all!);

describe('units (CODATA 2018)', () => {
  it('ħ²/m_e is 7.6199642 eV·Å²', () => {
    // CODATA 2018 (NIST): 2 × 3.80998212 eV·Å² (ħ²/2m_e), as quoted in physics.md.
    assert.ok(Math.abs(HBAR2_OVER_ME_EV_A2 - 7.6199642) < 2e-7);
  });

  it('agrees with the physical constants shipped by mathjs', () => {
    // mathjs' built-in constants (general-purpose reference library; CODATA values).
    const hbar = math.evaluate('reducedPlanckConstant').toNumber('J s');
    const me = math.evaluate('electronMass').toNumber('kg');
    const e = math.evaluate('elementaryCharge').toNumber('C');
    const ref = ((hbar * hbar) / (me * e)) * 1e20;
    assert.ok(Math.abs(HBAR2_OVER_ME_EV_A2 - ref) / ref < 1e-8, `${HBAR2_OVER_ME_EV_A2} vs ${ref}`);
    const a0 = math.evaluate('bohrRadius').toNumber('angstrom');
    assert.ok(Math.abs(BOHR_ANGSTROM - a0) < 1e-9);
  });

  it('Hartree is twice the Rydberg energy', () => {
    // CODATA 2018: E_h = 27.211386245988 eV, R∞hc = 13.605693122994 eV.
    assert.ok(Math.abs(HARTREE_EV - 2 * RYDBERG_EV) < 1e-11);
    assert.equal(HARTREE_EV, 27.211386245988);
  });

  it('curvature and mass are inverse conversions; a free electron has m* = 1', () => {
    // Free electron E = ħ²k²/2m_e has d²E/dk² = ħ²/m_e (analytic).
    assert.ok(Math.abs(curvatureToMass(HBAR2_OVER_ME_EV_A2) - 1) < 1e-15);
    assert.ok(Math.abs(massToCurvature(curvatureToMass(3.3)) - 3.3) < 1e-12);
  });

  it('k_B T at 300 K is about 25.9 meV', () => {
    // physics.md: kT at 300 K ≈ 25.9 meV (CODATA 2018 k_B = 8.617333262e-5 eV/K).
    assert.ok(Math.abs(thermalEnergyEv(300) - 0.025852) < 1e-5);
  });
});
