import assert from 'node:assert/strict';
import {
  averagedFromPrincipal,
  conductivityMass,
  densityOfStatesMass,
  directionStarSize,
  multiBandDosMass,
} from '../../../src/core/analysis/averagedMasses';
import { warpedDosMass, warpedEnergies, warpedInverseMass, type WarpingParameters } from '../../../src/core/analysis/warpedBands';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { cartesianOperation } from '../../../src/core/analysis/symmetryTensor';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { cubicLattice, pathModel, simpleCubicStructure } from '../../support/models';

describe('averaged masses', () => {
  it('Si electrons: m_l = 0.98, m_t = 0.19, N_v = 6 give m_dos ≈ 1.08 and m_c ≈ 0.26 (Sze & Ng, memory)', () => {
    // Handbook values recalled from memory (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., appendix).
    assert.ok(Math.abs(densityOfStatesMass([0.98, 0.19, 0.19], 6) - 1.08) < 0.01);
    assert.ok(Math.abs(conductivityMass([0.98, 0.19, 0.19]) - 0.26) < 0.005);
  });

  it('an isotropic single valley: both averages equal the mass (analytic)', () => {
    assert.ok(Math.abs(densityOfStatesMass([0.067, 0.067, 0.067], 1) - 0.067) < 1e-15);
    assert.ok(Math.abs(conductivityMass([0.067, 0.067, 0.067]) - 0.067) < 1e-15);
  });

  it('combines hole bands as (Σ m_i^(3/2))^(2/3) (physics.md step 9)', () => {
    // Two equal bands of mass m: (2 m^(3/2))^(2/3) = 2^(2/3) m (analytic).
    assert.ok(Math.abs(multiBandDosMass([0.5, 0.5]) - 2 ** (2 / 3) * 0.5) < 1e-15);
    // Si heavy and light holes 0.49 and 0.16 (memory, Sze & Ng): (0.49^1.5 + 0.16^1.5)^(2/3) ≈ 0.55.
    assert.ok(Math.abs(multiBandDosMass([0.49, 0.16]) - 0.55) < 0.01);
  });

  it('refuses a saddle point and states its inputs otherwise', () => {
    const saddle = averagedFromPrincipal([0.2, 0.3, -0.5], 1, 'fitted mass tensor');
    assert.equal(saddle.dosMass, null);
    assert.match(saddle.note, /both signs/);
    const holes = averagedFromPrincipal([-0.3, -0.3, -0.3], null, 'fitted mass tensor');
    assert.ok(Math.abs(holes.dosMass! - 0.3) < 1e-12); // isotropic, N_v taken as 1: analytic
    assert.match(holes.note, /N_v unknown/);
    assert.match(holes.note, /hole/);
  });
});

describe('path-limited density-of-states mass at a warped degenerate maximum', () => {
  // A simple cubic crystal (m-3m) whose two top valence bands follow the warped form of Dresselhaus, Kip &
  // Kittel (Phys. Rev. 98, 368 (1955)) with silicon's cyclotron-resonance parameters (physics.md, memory).
  const P: WarpingParameters = { A: -4.1, B: 1.6, C: 3.3 };
  const a = 5;
  const branch = (b: 1 | -1) => (kc: Vec3) => {
    const e = warpedEnergies(P, kc);
    return b === 1 ? e.upper : e.lower;
  };
  const bs = pathModel({
    lattice: cubicLattice(a),
    structure: simpleCubicStructure(a),
    bands: [(kc) => branch(-1)(kc), (kc) => branch(1)(kc), (kc) => 2 + (HBAR2_OVER_ME_EV_A2 / 2) * (kc[0] ** 2 + kc[1] ** 2 + kc[2] ** 2)],
    electrons: 4,
    legs: [
      [
        { label: 'X', k: [0.5, 0, 0] },
        { label: 'Γ', k: [0, 0, 0] },
        { label: 'M', k: [0.5, 0.5, 0] },
      ],
      [
        { label: 'Γ', k: [0, 0, 0] },
        { label: 'R', k: [0.5, 0.5, 0.5] },
      ],
    ],
    pointsPerSegment: 81,
  });

  before(async () => {
    await ensureSymmetryReady();
  });

  it('weights [100], [110], [111] by 6, 12, 8 and its error estimate covers the full-sphere value', () => {
    const vbm = analyzeBandStructure(bs).extrema.find((e) => e.kind === 'vbm')!;
    assert.equal(vbm.degenerateBands, 2);
    // Star sizes of the three directions in m-3m (International Tables, Vol. A: multiplicities of ⟨100⟩,
    // ⟨110⟩, ⟨111⟩ as ±directions): 6, 12, 8.
    const ops = symmetryOps();
    assert.equal(directionStarSize([1, 0, 0], ops), 6);
    assert.equal(directionStarSize([Math.SQRT1_2, Math.SQRT1_2, 0], ops), 12);
    assert.equal(directionStarSize([1, 1, 1].map((x) => x / Math.sqrt(3)) as Vec3, ops), 8);
    // Expected: the star-weighted average of the analytic directional masses of the form, per branch.
    const m = (u: Vec3, b: 1 | -1): number => Math.abs(1 / warpedInverseMass(P, u, b));
    const starAvg = (b: 1 | -1): number =>
      ((6 * m([1, 0, 0], b) ** 1.5 + 12 * m([1, 1, 0], b) ** 1.5 + 8 * m([1, 1, 1], b) ** 1.5) / 26) ** (2 / 3);
    const expected = (starAvg(1) ** 1.5 + starAvg(-1) ** 1.5) ** (2 / 3);
    assert.ok(vbm.dosMass !== null);
    assert.ok(Math.abs(vbm.dosMass / expected - 1) < 0.005, `${vbm.dosMass} vs ${expected}`);
    // The full-sphere value of the same form (angular integration): the error estimate must cover it.
    const sphere = (warpedDosMass(P, 1)! ** 1.5 + warpedDosMass(P, -1)! ** 1.5) ** (2 / 3);
    const note = vbm.warnings.find((w) => /Path-limited/.test(w));
    assert.ok(note, vbm.warnings.join('\n'));
    assert.ok(vbm.dosMassPathLimited);
    const err = vbm.dosMassPathLimited.error;
    assert.match(note, /± /);
    assert.ok(Math.abs(vbm.dosMass - sphere) <= 1.05 * err + 1e-3, `${vbm.dosMass} vs sphere ${sphere}, error ${err}`);
    assert.ok(err > 0);
  });

  function symmetryOps(): Mat3[] {
    const sym = crystalSymmetry(simpleCubicStructure(a));
    return sym.reciprocalPointGroup.map((r) => cartesianOperation(r, cubicLattice(a)));
  }
});
