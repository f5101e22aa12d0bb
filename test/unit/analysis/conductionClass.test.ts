/**
 * Insulator / metal / semimetal classification on model band structures whose answer is known analytically
 * (test/support/metalModels.ts: free-electron metal, Ashcroft & Mermin ch. 2; smearing functions of
 * Fermi–Dirac, Gaussian and Methfessel & Paxton, Phys. Rev. B 40, 3616 (1989)), and a property test: with a
 * written Fermi level, `metal` is true exactly when that level lies inside the energy range of some band.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { FERMI_INSIDE_TOLERANCE_EV } from '../../../src/core/analysis/conductionClass';
import { reportToJson } from '../../../src/core/report/reportJson';
import { summaryText } from '../../../src/core/report/summaryText';
import { makeBands, type BandsSpec } from '../../support/bandStructure';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import {
  FE_A,
  SEMIMETAL_OVERLAP_EV,
  freeElectronFermi,
  freeElectronKF,
  freeElectronMetal,
  halfMetal,
  smearedFreeElectronMetal,
  smearedOccupations,
  smearedSemiconductor,
  twoBandSemimetal,
} from '../../support/metalModels';
import { spinOrbitModel } from '../../support/writers/roundTripModel';

/** Three separate bands at two k-points: band 1 spans −3.1 … −3 eV, band 2 −1.2 … −1 eV, band 3 2 … 2.5 eV. */
const threeBandsAtTwoK = (extra: Partial<BandsSpec>) =>
  // prettier-ignore
  makeBands({ kpoints: [[0, 0, 0], [0.5, 0, 0]], energies: [[[-3, -1, 2], [-3.1, -1.2, 2.5]]], ...extra });

describe('metal, semimetal or insulator', () => {
  it('the free-electron model has its Fermi sphere inside the zone: band 1 crosses E_F between Γ and X', () => {
    // Ashcroft & Mermin eq. 2.21: k_F = (3π²/a³)^(1/3) = 0.7734 Å⁻¹ for a = 4 Å (hand arithmetic), below π/a = 0.7854 Å⁻¹ (X).
    assert.ok(freeElectronKF(1, FE_A) < Math.PI / FE_A);
    assert.ok(Math.abs(freeElectronKF(1, FE_A) - 0.7734) < 1e-4);
  });

  for (const kind of ['fermi-dirac', 'gaussian', 'methfessel-paxton'] as const) {
    it(`a free-electron metal with ${kind} occupations is a metal, band 1 crossing the written Fermi level`, () => {
      const bs = smearedFreeElectronMetal(kind, 0.1);
      const r = analyzeBandStructure(bs);
      assert.equal(r.metal, true, r.classificationReason);
      assert.equal(r.semimetal, false);
      assert.equal(r.gap, null);
      assert.deepEqual(r.crossingBands, [1]);
      assert.equal(r.fermi_eV, freeElectronFermi(1, FE_A)); // as written (A&M eq. 2.24)
      assert.match(r.classificationReason, /occupations show band 1 filled at some k-points and empty at others/);
      assert.equal(r.extrema.length, 0);
    });
  }

  it('Methfessel–Paxton occupations overshoot 1 just below E_F (Methfessel & Paxton 1989), and are still read as a metal', () => {
    const bs = smearedFreeElectronMetal('methfessel-paxton', 0.2);
    const max = Math.max(...bs.occupations![0]!);
    assert.ok(max > 1, String(max)); // property of the order-1 function: S_1(x) > 1 for some x < 0
    assert.equal(analyzeBandStructure(bs).metal, true);
  });

  it('without occupations, the written Fermi energy inside band 1 decides', () => {
    const r = analyzeBandStructure(freeElectronMetal());
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /Fermi energy the file writes .* lies inside the energy range of band 1/);
  });

  it('without occupations or Fermi energy, an odd electron count without spin polarisation decides', () => {
    const bs = freeElectronMetal();
    bs.fermiEnergy = null;
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, true);
    assert.match(r.classificationReason, /1 electrons without spin polarisation \(two electrons per band\) fill 0.5 bands/);
    // Filling the sampled states gives an estimate of E_F inside band 1 and says so.
    assert.ok(r.fermi_eV !== null && r.fermi_eV > 0);
    assert.match(r.classificationReason, /estimated/);
  });

  it('a non-integer electron count (2.9) is a metal whatever the band order', () => {
    const bs = threeBandsAtTwoK({ electrons: 2.9 });
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, true);
    assert.equal(r.gap, null);
    assert.match(r.classificationReason, /fill 1.45 bands: band 2 is partly filled/); // 2.9 / 2 per band
  });

  it('the same odd count with spinors fills whole bands: one electron per band (common practice)', () => {
    const bs = threeBandsAtTwoK({ electrons: 1, spinorbit: true });
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, false);
    assert.equal(r.spinors, true);
    assert.ok(r.gap && Math.abs(r.gap.eV - 1.8) < 1e-12); // hand count: band 1 top −3 eV, band 2 bottom −1.2 eV
  });

  it('a two-band semimetal (hole pocket at Γ, electron pocket at X) is a semimetal, by count, Fermi energy or occupations', () => {
    const byFermi = analyzeBandStructure(twoBandSemimetal());
    const noFermi = twoBandSemimetal();
    noFermi.fermiEnergy = null;
    const byCount = analyzeBandStructure(noFermi);
    const withOcc = twoBandSemimetal();
    withOcc.occupations = smearedOccupations(withOcc, 'fermi-dirac', 0, 0.01);
    const byOcc = analyzeBandStructure(withOcc);
    for (const r of [byFermi, byCount, byOcc]) {
      assert.equal(r.metal, true, r.classificationReason);
      assert.equal(r.semimetal, true, r.classificationReason);
      assert.deepEqual(r.crossingBands, [2, 3]);
      // Analytic model: band 2 top +0.1 eV at Γ, band 3 bottom −0.1 eV at X: overlap 0.2 eV.
      assert.match(r.classificationReason, new RegExp(`overlap by ${SEMIMETAL_OVERLAP_EV.toFixed(4)} eV`));
    }
    assert.match(byCount.classificationReason, /highest filled state \(0.1000 eV\) lies at or above the lowest empty one \(-0.1000 eV\)/);
  });

  it('a metal whose overlap is inside one band pair that crosses is not called a semimetal', () => {
    // Bands 1 and 2 cross at k1 (E equal): not clearly distinct bands.
    const bs = makeBands({
      kpoints: [
        [0, 0, 0],
        [0.25, 0, 0],
        [0.5, 0, 0],
      ],
      energies: [
        [
          [0.3, 0.5],
          [0.4, 0.4],
          [-0.5, -0.2],
        ],
      ],
      electrons: 2,
      fermiEnergy: 0,
    });
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, true);
    assert.equal(r.semimetal, false);
  });

  it('a spin-polarised half-metal: spin up metallic, spin down gapped, overall a metal, per spin in JSON', () => {
    const r = analyzeBandStructure(halfMetal());
    assert.equal(r.metal, true);
    assert.ok(r.spinChannels);
    assert.equal(r.spinChannels[0]!.metal, true);
    assert.equal(r.spinChannels[1]!.metal, false);
    assert.match(r.classificationReason, /half-metal/);
    // Spin down's gap: band 2 bottom at X minus band 1 top at R, (ħ²/2m)(π/a)²(1 − 3) + 12 eV (the model above).
    const unit = (HBAR2_OVER_ME_EV_A2 / 2) * (Math.PI / FE_A) ** 2;
    assert.equal(r.spinGaps?.[0], null);
    assert.ok(r.spinGaps?.[1] && Math.abs(r.spinGaps[1].eV - (12 - 2 * unit)) < 1e-9, String(r.spinGaps?.[1]?.eV));
    const j = reportToJson(r) as { spinChannels: { metal: boolean; semimetal: boolean; fermi_eV: number; classificationReason: string }[] };
    assert.deepEqual(
      j.spinChannels.map((c) => c.metal),
      [true, false],
    );
    assert.ok(j.spinChannels.every((c) => typeof c.classificationReason === 'string' && 'fermi_eV' in c && 'semimetal' in c));
  });

  it('a semiconductor with Gaussian smearing tails (1e-5) stays a semiconductor with its 1.2 eV gap', () => {
    const bs = smearedSemiconductor(0.2);
    const tail = Math.max(...Array.from(bs.occupations![0]!).map((x) => Math.min(x, 1 - x)));
    assert.ok(tail > 1e-6 && tail < 1e-4, String(tail)); // ½ erfc(3) = 1.1e-5 (Gaussian smearing)
    const r = analyzeBandStructure(bs);
    assert.equal(r.metal, false);
    assert.ok(r.gap && Math.abs(r.gap.eV - 1.2) < 1e-9); // analytic model gap
  });

  it('larger tails (σ = 0.3 eV, ½ erfc(2) ≈ 2e-3) still give a semiconductor, with a warning', () => {
    const r = analyzeBandStructure(smearedSemiconductor(0.3));
    assert.equal(r.metal, false);
    assert.ok(r.warnings.some((w) => /Smearing tails reach/.test(w)));
  });

  it('JSON carries metal, semimetal, fermi_eV, classificationReason and spinors', () => {
    const j = reportToJson(analyzeBandStructure(spinOrbitModel()));
    for (const key of ['metal', 'semimetal', 'fermi_eV', 'classificationReason', 'spinors']) assert.ok(key in j, key);
    assert.equal(j.spinors, true);
    assert.equal(j.metal, false);
    assert.match(summaryText(analyzeBandStructure(spinOrbitModel())), /spinors \(noncollinear: one electron per band\)/);
    assert.doesNotMatch(summaryText(analyzeBandStructure(spinOrbitModel())), /spin-degenerate/);
  });

  it("a metal's pockets near E_F are characterised: free-electron band bottom m* = 1, semimetal pockets ħ²/(2|t|a²)", () => {
    // Free electron (Ashcroft & Mermin ch. 2): E = ħ²k²/2m exactly, so m* = 1 m_e at Γ, 2.28 eV below E_F.
    const fe = analyzeBandStructure(smearedFreeElectronMetal('gaussian', 0.1), { range_eV: 3 });
    const bottom = fe.extrema.find((e) => e.kind === 'valley' && e.label === 'Γ');
    assert.ok(bottom && bottom.masses.length > 0, JSON.stringify(fe.extrema.map((e) => [e.kind, e.label])));
    for (const m of bottom.masses) assert.ok(Math.abs(m.mass - 1) < 1e-3, String(m.mass));
    assert.ok(Math.abs(bottom.offset_eV - freeElectronFermi(1, FE_A)) < 1e-9); // measured from E_F
    // Default range 0.5 eV: the band bottom, 2.28 eV below E_F, is not listed.
    assert.ok(!analyzeBandStructure(smearedFreeElectronMetal('gaussian', 0.1)).extrema.some((e) => e.label === 'Γ' && e.kind === 'valley'));
    // Semimetal pockets (cosine bands, analytic mass ħ²/(2|t|a²), t = 0.3 and 0.4 eV, a = 4 Å); a 25 meV
    // parabola window on a cosine band reads up to a few % heavy (quartic term), hence 3 %.
    const sm = analyzeBandStructure(twoBandSemimetal());
    const hole = sm.extrema.find((e) => e.kind === 'peak');
    const electron = sm.extrema.find((e) => e.kind === 'valley');
    assert.ok(hole && electron);
    assert.equal(hole.band, 2);
    assert.equal(electron.band, 3);
    const mh = HBAR2_OVER_ME_EV_A2 / (2 * 0.3 * FE_A * FE_A);
    const me = HBAR2_OVER_ME_EV_A2 / (2 * 0.4 * FE_A * FE_A);
    for (const m of hole.masses) assert.ok(Math.abs(-m.mass - mh) / mh < 0.03, String(m.mass));
    for (const m of electron.masses) assert.ok(Math.abs(m.mass - me) / me < 0.03, String(m.mass));
    assert.match(summaryText(sm), /hole pocket top \(100 meV from the Fermi level\)/);
  });

  it('property: any mix of occupations, Fermi energy, count, spins and spinors gives a consistent verdict', () => {
    const arb = fc.record({
      nk: fc.integer({ min: 1, max: 6 }),
      nb: fc.integer({ min: 1, max: 5 }),
      nSpin: fc.constantFrom(1, 2),
      seed: fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 60, maxLength: 60 }),
      occ: fc.option(fc.array(fc.double({ min: -0.1, max: 2.1, noNaN: true }), { minLength: 60, maxLength: 60 })),
      fermi: fc.option(fc.double({ min: -6, max: 6, noNaN: true })),
      electrons: fc.option(fc.double({ min: 0, max: 12, noNaN: true })),
      spinorbit: fc.boolean(),
    });
    fc.assert(
      fc.property(arb, (a) => {
        const kpoints = Array.from({ length: a.nk }, (_, i) => [i / 10, 0, 0]);
        const at = (arr: number[], s: number, k: number, b: number): number => arr[(s * 30 + k * a.nb + b) % arr.length]!;
        const energies = Array.from({ length: a.nSpin }, (_, s) =>
          kpoints.map((_, k) => Array.from({ length: a.nb }, (_, b) => at(a.seed, s, k, b)).sort((x, y) => x - y)),
        );
        const occupations = a.occ
          ? Array.from({ length: a.nSpin }, (_, s) => kpoints.map((_, k) => Array.from({ length: a.nb }, (_, b) => at(a.occ!, s, k, b))))
          : undefined;
        const r = analyzeBandStructure(
          makeBands({
            kpoints,
            energies,
            occupations,
            fermiEnergy: a.fermi,
            electrons: a.electrons,
            spinorbit: a.spinorbit && a.nSpin === 1,
          }),
        );
        if (r.metal) assert.equal(r.gap, null);
        if (r.gap) assert.equal(r.metal, false);
        if (r.metal !== true) assert.notEqual(r.semimetal, true);
        assert.ok(r.fermi_eV === null || Number.isFinite(r.fermi_eV));
        for (const b of r.crossingBands ?? []) assert.ok(b >= 1 && b <= a.nb);
        assert.ok(r.classificationReason.length > 0);
        if (a.nSpin === 2) assert.equal(r.spinChannels?.length, 2);
        return true;
      }),
      { numRuns: 400 },
    );
  });

  it('property: with a written Fermi level, metal exactly when it lies inside some band (analytic truth)', () => {
    const band = fc.record({
      centre: fc.double({ min: -5, max: 5, noNaN: true }),
      width: fc.double({ min: 0, max: 3, noNaN: true }),
      phase: fc.double({ min: 0, max: 6.28, noNaN: true }),
    });
    fc.assert(
      fc.property(
        fc.array(band, { minLength: 1, maxLength: 5 }),
        fc.integer({ min: 2, max: 12 }),
        fc.double({ min: -8, max: 8, noNaN: true }),
        fc.boolean(),
        (bands, nk, ef, withOcc) => {
          const kpoints = Array.from({ length: nk }, (_, i) => [i / (2 * (nk - 1)), 0, 0]);
          const rows = kpoints.map((k) =>
            bands.map((b) => b.centre + b.width * Math.cos(2 * Math.PI * k[0]! + b.phase)).sort((x, y) => x - y),
          );
          // Ranges of the bands as sorted by energy (the file's band order).
          const nb = bands.length;
          const ranges = Array.from({ length: nb }, (_, b) => ({
            min: Math.min(...rows.map((r) => r[b]!)),
            max: Math.max(...rows.map((r) => r[b]!)),
          }));
          const margin = 2 * FERMI_INSIDE_TOLERANCE_EV;
          fc.pre(ranges.every((r) => Math.abs(r.min - ef) > margin && Math.abs(r.max - ef) > margin));
          const inside = ranges.some((r) => r.min < ef && ef < r.max);
          const occupations = withOcc ? [rows.map((r) => r.map((e) => (e < ef ? 1 : 0)))] : undefined;
          const bs = makeBands({ kpoints, energies: [rows], fermiEnergy: ef, occupations });
          const r = analyzeBandStructure(bs);
          return r.metal === inside && (inside ? r.gap === null : true);
        },
      ),
      { numRuns: 300 },
    );
  });
});
