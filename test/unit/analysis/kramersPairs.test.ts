/**
 * Spinor (spin–orbit) runs of a crystal with inversion symmetry: every band is a Kramers pair, twofold
 * degenerate at every k (time reversal with inversion: common practice). Such a pair is the spin degeneracy of
 * the same bands without spin–orbit coupling, so its masses, valley count and averaged masses must equal those of
 * the run written without spinors (one band per pair, two electrons per band). Model: the simple cubic one-band
 * tight-binding pair E_v = −3 − 2t_v Σ(1 − cos 2πk_i), E_c = 1 + 2t_c Σ(1 − cos 2πk_i) (a published analytic
 * model, masses ħ²/(2ta²) exactly; invented numbers), as a path and as a Γ-centred 8×8×8 mesh run. Without
 * inversion the pairs split away from the time-reversal-invariant points and are not paired; the density-of-
 * states mass of a degenerate set then counts each spinor band as half a spin-degenerate one.
 */
import assert from 'node:assert/strict';
import type { BandStructure, ExtremumReport, Report, Vec3 } from '../../../src/core/model';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { kramersRepresentatives, KRAMERS_PAIR_TOLERANCE_EV } from '../../../src/core/analysis/kramersPairs';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { cosineBand, cosineMass, cubicLattice, pathModel, pointsModel, simpleCubicStructure, type Dispersion } from '../../support/models';

const A = 4;
const TV = 0.5;
const TC = 0.6;
const valence = cosineBand(-3, [-TV, -TV, -TV]);
const conduction = cosineBand(1, [TC, TC, TC]);
const G: Vec3 = [0, 0, 0];
const X: Vec3 = [0.5, 0, 0];
const M: Vec3 = [0.5, 0.5, 0];
const R: Vec3 = [0.5, 0.5, 0.5];

function path(bands: Dispersion[], spinors: boolean): BandStructure {
  const bs = pathModel({
    lattice: cubicLattice(A),
    bands,
    electrons: 2,
    structure: simpleCubicStructure(A),
    legs: [
      [
        { label: 'Γ', k: G },
        { label: 'X', k: X },
        { label: 'M', k: M },
        { label: 'Γ', k: G },
        { label: 'R', k: R },
      ],
    ],
    pointsPerSegment: 40,
  });
  bs.spinorbit = spinors;
  return bs;
}

function mesh(bands: Dispersion[], spinors: boolean): BandStructure {
  const sym = crystalSymmetry(simpleCubicStructure(A));
  const m = irreducibleMesh([8, 8, 8], [0, 0, 0], sym.reciprocalPointGroup);
  const kpoints = Array.from({ length: m.kpoints.length / 3 }, (_, i) => [0, 1, 2].map((j) => m.kpoints[3 * i + j]!) as Vec3);
  const bs = pointsModel({ lattice: cubicLattice(A), bands, electrons: 2, kpoints, structure: simpleCubicStructure(A) });
  bs.weights = Float64Array.from(m.weights);
  bs.spinorbit = spinors;
  return bs;
}

const edge = (r: Report, kind: 'vbm' | 'cbm'): ExtremumReport => r.extrema.find((e) => e.kind === kind)!;

describe('Kramers pairs of spinor runs', function () {
  this.timeout(60000);
  before(() => ensureSymmetryReady());

  it('a path run: each pair one band, the same masses, tensor, valley count and averaged masses as without spinors', () => {
    const plain = analyzeBandStructure(path([valence, conduction], false));
    const spinor = analyzeBandStructure(path([valence, valence, conduction, conduction], true));
    for (const kind of ['vbm', 'cbm'] as const) {
      const a = edge(plain, kind);
      const b = edge(spinor, kind);
      assert.equal(b.degenerateBands, 2);
      assert.equal(b.valleyDegeneracy, a.valleyDegeneracy);
      assert.ok(
        b.masses.every((m) => m.branch === undefined),
        'no branches: the pair is one band',
      );
      assert.ok(b.dosMass !== null && Math.abs(b.dosMass - a.dosMass!) < 1e-9, `${kind} DOS ${b.dosMass} vs ${a.dosMass}`);
      assert.ok(b.conductivityMass !== null && Math.abs(b.conductivityMass - a.conductivityMass!) < 1e-9);
      assert.ok(
        b.warnings.some((w) => /a Kramers pair/.test(w)),
        b.warnings.join('\n'),
      );
    }
    // The cosine band's analytic mass at its extremum: ħ²/(2 t a²) (physics.md, common practice).
    assert.ok(Math.abs(edge(spinor, 'cbm').dosMass! - cosineMass(TC, A)) < 0.01 * cosineMass(TC, A));
    assert.equal(edge(spinor, 'cbm').band, 3, 'a minimum named by its lower band');
    assert.equal(edge(spinor, 'vbm').band, 2, 'a maximum by its upper band');
  });

  it('a mesh run: one band per pair interpolated, the same tensor as without spinors, quotable', () => {
    const plain = analyzeBandStructure(mesh([valence, conduction], false));
    const spinor = analyzeBandStructure(mesh([valence, valence, conduction, conduction], true));
    assert.ok(spinor.interpolation, spinor.warnings.join('\n'));
    for (const kind of ['vbm', 'cbm'] as const) {
      const a = edge(plain, kind);
      const b = edge(spinor, kind);
      assert.equal(b.degenerateBands, 2 * a.degenerateBands);
      assert.equal(b.tensor?.determined, a.tensor?.determined, b.tensor?.undeterminedReason);
      b.tensor!.principal.forEach((m, i) => assert.ok(Math.abs(m - a.tensor!.principal[i]!) < 1e-9 * Math.abs(m)));
      assert.ok(b.dosMass !== null && Math.abs(b.dosMass - a.dosMass!) < 1e-9);
    }
    assert.equal(edge(spinor, 'cbm').band, 3);
    assert.equal(edge(spinor, 'vbm').band, 2);
    assert.ok(Math.abs(spinor.gap!.eV - plain.gap!.eV) < 1e-9);
  });

  it('pairs split away from Γ (no inversion) are not paired; the DOS mass of the set at Γ counts each band as half', () => {
    // A spin splitting cubic in k along x, as the conduction band of a crystal without inversion has at Γ
    // (Dresselhaus's k³ term; invented size): the pair meets at Γ only, and the minimum stays there.
    const split =
      (d: number): Dispersion =>
      (kc, kf) =>
        conduction(kc, kf) + d * Math.sin(2 * Math.PI * kf[0]) ** 3;
    const bs = path([valence, valence, split(-0.05), split(0.05)], true);
    assert.equal(kramersRepresentatives(bs, 0, [2, 3], 2), null);
    const r = analyzeBandStructure(bs);
    const cbm = edge(r, 'cbm');
    assert.equal(cbm.degenerateBands, 2);
    assert.ok(!cbm.warnings.some((w) => /Kramers pair/.test(w)));
    const note = cbm.warnings.find((w) => /Path-limited density-of-states mass/.test(w));
    assert.match(note ?? '', /× \(0\.5\)\^\(2\/3\) \(a spinor run/);
    // The cubic term has no curvature at Γ: both branches keep the band's mass ħ²/(2ta²), and the pair's two
    // states make one spin-degenerate band's worth: the DOS mass is that mass (within the fits' window error).
    const m = cosineMass(TC, A);
    assert.ok(Math.abs(cbm.dosMass! - m) < 0.03 * m, `${cbm.dosMass} vs ${m}`);
  });

  it('the tolerance is a meV: pairs written to 1e-4 eV still pair, a 2 meV splitting does not', () => {
    const bs = path([valence, (kc, kf) => valence(kc, kf) + 0.5 * KRAMERS_PAIR_TOLERANCE_EV, conduction, conduction], true);
    assert.deepEqual(kramersRepresentatives(bs, 0, [0, 1], 1), [1]);
    const wide = path([valence, (kc, kf) => valence(kc, kf) + 2 * KRAMERS_PAIR_TOLERANCE_EV, conduction, conduction], true);
    assert.equal(kramersRepresentatives(wide, 0, [0, 1], 1), null);
    assert.equal(
      kramersRepresentatives(path([valence, valence, conduction, conduction], false), 0, [0, 1], 1),
      null,
      'no spinors: no pairs',
    );
  });
});
