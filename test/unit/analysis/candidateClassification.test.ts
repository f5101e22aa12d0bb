/**
 * Which candidates are extrema: minima and maxima only. Crossings, saddles and the rounding of the written
 * energies must not become valleys or peaks. Every model here is analytic: the true extrema are known in
 * closed form, so the expectations are derived, not recorded.
 */
import assert from 'node:assert/strict';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import type { Report, Vec3 } from '../../../src/core/model';
import { cosineBand, cubicLattice, parabolicBand, pathModel, type Dispersion, type PathLeg } from '../../support/models';

const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
const Y: PathLeg = { label: 'Y', k: [0, 0.5, 0] };
const M: PathLeg = { label: 'M', k: [0.5, 0.5, 0] };

const A = 4; // Å, simple cubic
const A_LATTICE = A;
/** Cartesian k (Å⁻¹) of fractional kx along x for the cubic lattice: 2π kx / a. */
const kx = (f: number): number => (2 * Math.PI * f) / A;

const near = (a: Vec3, b: Vec3, tol = 1e-9): boolean => a.every((x, i) => Math.abs(x - b[i]!) <= tol);

function valleysAt(r: Report, k: Vec3): number {
  return r.extrema.filter((e) => e.kind === 'valley' && near(e.k, k)).length;
}

describe('candidate classification: crossings', () => {
  // Two straight bands E = Ec ± v (kx − k0) crossing at k0 = a quarter of Γ–X (a sampled point): by band index
  // the upper one has a "V" minimum there and the lower one a "Λ" maximum, yet each branch runs straight
  // through. Analytic model (common practice: a band-index kink at a crossing is not an extremum).
  const k0f = 0.25;
  const v = 1.0; // eV·Å
  const Ec = 3.5;
  const lines = (gap: number): Dispersion[] => [
    (kc) => Ec + Math.sqrt((v * (kc[0] - kx(k0f))) ** 2 + (gap / 2) ** 2),
    (kc) => Ec - Math.sqrt((v * (kc[0] - kx(k0f))) ** 2 + (gap / 2) ** 2),
  ];
  const model = (gap: number) =>
    pathModel({
      lattice: cubicLattice(A),
      // valence: a free-hole band at Γ; conduction: a heavy parabolic band (the CBM at Γ) far below the lines.
      bands: [parabolicBand(-1, -0.5), parabolicBand(2, 5), ...lines(gap)],
      electrons: 2,
      legs: [[G, X, M]],
      pointsPerSegment: 41,
    });

  for (const gap of [0, 0.002]) {
    it(`two straight bands crossing ${gap ? 'with a 2 meV avoided gap' : 'with no gap'} are a crossing, not a valley`, () => {
      const r = analyzeBandStructure(model(gap), { range_eV: 2 });
      const kc: Vec3 = [k0f, 0, 0];
      assert.equal(valleysAt(r, kc), 0, JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])));
      const rej = (r.rejected ?? []).filter((x) => near(x.k, kc));
      assert.ok(rej.length >= 1, JSON.stringify(r.rejected));
      assert.ok(
        rej.every((x) => x.reason === 'crossing'),
        JSON.stringify(rej),
      );
      // The upper band of the pair (band 4, 1-based) is the one with the "V".
      assert.ok(rej.some((x) => x.band === 4));
    });
  }

  it('a true parabolic valley just below another band is still a valley (the test is not a blanket rejection)', () => {
    // Two stacked parabolic minima at the same k0, 10 meV apart (inside the 25 meV window): no slopes, no crossing.
    const k0: Vec3 = [kx(k0f), 0, 0];
    const bs = pathModel({
      lattice: cubicLattice(A),
      bands: [parabolicBand(-1, -0.5), parabolicBand(2, 5), parabolicBand(3.0, 0.4, k0), parabolicBand(3.01, 0.3, k0)],
      electrons: 2,
      legs: [[G, X, M]],
      pointsPerSegment: 41,
    });
    const r = analyzeBandStructure(bs, { range_eV: 2 });
    const v3 = r.extrema.find((e) => e.kind === 'valley' && near(e.k, [k0f, 0, 0]) && e.band === 3);
    assert.ok(v3, JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])));
    // Analytic mass 0.4 (parabolic band built with it).
    assert.ok(
      v3.masses.every((m) => Math.abs(m.mass - 0.4) < 1e-6),
      JSON.stringify(v3.masses.map((m) => m.mass)),
    );
    assert.ok(!(r.rejected ?? []).some((x) => x.reason === 'crossing'));
  });
});

describe('candidate classification: saddles', () => {
  const m = 2;
  /** E = 2 eV + (kx² − ky²)ħ²/2m (analytic saddle at Γ) above a filled parabolic band, on the given legs. */
  const saddleRun = (legs: PathLeg[][]) => {
    const saddle: Dispersion = (kc) => 2 + (HBAR2_OVER_ME_EV_A2 / (2 * m)) * (kc[0] ** 2 - kc[1] ** 2);
    return pathModel({ lattice: cubicLattice(A), bands: [parabolicBand(-1, -0.5), saddle], electrons: 2, legs, pointsPerSegment: 41 });
  };

  it('E = E0 + (kx² − ky²)ħ²/2m at Γ on the path X–Γ–Y is a saddle, not a valley', () => {
    const bs = saddleRun([[X, G, Y]]);
    const r = analyzeBandStructure(bs, { range_eV: 3 });
    assert.equal(r.extrema.filter((e) => e.kind === 'valley' && near(e.k, [0, 0, 0])).length, 0);
    const at = (r.rejected ?? []).filter((x) => near(x.k, [0, 0, 0]) && x.band === 2);
    assert.equal(at.length, 1, JSON.stringify(r.rejected));
    assert.equal(at[0]!.reason, 'saddle');
  });

  it('the same band on the path X–Γ–X (no direction where it falls) is a minimum with m* = +2', () => {
    // Control: along x alone the saddle band is an upward parabola of mass m (analytic).
    const bs = saddleRun([[G, X]]);
    const r = analyzeBandStructure(bs, { range_eV: 3 });
    const cbm = r.extrema.find((e) => e.kind === 'cbm')!;
    assert.ok(near(cbm.k, [0, 0, 0]));
    assert.ok(Math.abs(cbm.masses[0]!.mass - m) < 1e-6); // analytic m = 2
  });
});

describe('candidate classification: degenerate points', () => {
  // Two conduction bands touching at Γ (E = 2 eV): A = 2 + ħ²k²/2m rises in every direction; B rises along y
  // like A but falls along x as −ħ²kx²/2m'. By index the upper band has a minimum at Γ; the branch that falls
  // makes Γ a saddle of the pair, not a valley (analytic). The CBM is elsewhere (a band with its minimum at X).
  const c = (m: number): number => HBAR2_OVER_ME_EV_A2 / (2 * m);
  const A: Dispersion = (k) => 2 + c(1) * (k[0] ** 2 + k[1] ** 2);
  const model = (bx: number) =>
    pathModel({
      lattice: cubicLattice(A_LATTICE),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1.5, 1, [kx(0.5), 0, 0]), A, (k) => 2 + c(1) * k[1] ** 2 + bx * k[0] ** 2],
      electrons: 2,
      legs: [[X, G, Y]],
      pointsPerSegment: 41,
    });

  it('a branch that falls along one direction makes the degenerate point a saddle, not a valley', () => {
    const r = analyzeBandStructure(model(-c(20)), { range_eV: 1 });
    assert.ok(
      !r.extrema.some((e) => e.kind === 'valley' && near(e.k, [0, 0, 0])),
      JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])),
    );
    const at = (r.rejected ?? []).filter((x) => near(x.k, [0, 0, 0]));
    assert.equal(at.length, 1, JSON.stringify(r.rejected));
    assert.equal(at[0]!.reason, 'saddle');
    assert.match(at[0]!.detail, /branch/);
  });

  it('control: when both branches rise (B = 2 + ħ²(ky² + kx²/4)/2m), the degenerate point is a valley', () => {
    const r = analyzeBandStructure(model(c(4)), { range_eV: 1 });
    const v = r.extrema.find((e) => e.kind === 'valley' && near(e.k, [0, 0, 0]));
    assert.ok(v, JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])));
    assert.equal(v.degenerateBands, 2);
  });
});

describe('candidate classification: path ends', () => {
  it('a band still falling at the end of the path is set aside as boundary, not a valley there', () => {
    // A second conduction band E = 2.5 + ħ²|k − k0|²/2m with k0 beyond the path end Γ–M (a quarter of the way
    // further, on the same line): on the path it only falls towards the end (analytic).
    const k0: Vec3 = [(2 * Math.PI * 0.6) / A, (2 * Math.PI * 0.6) / A, 0];
    const bs = pathModel({
      lattice: cubicLattice(A),
      bands: [parabolicBand(-1, -0.5), parabolicBand(2, 0.5), parabolicBand(2.5, 0.8, k0)],
      electrons: 2,
      legs: [[G, M]],
      pointsPerSegment: 41,
    });
    const r = analyzeBandStructure(bs, { range_eV: 3 });
    // Bands are numbered by energy: the falling band is band 2 beyond the point where the two parabolas
    // cross (between samples, near 0.28 of Γ–M), band 3 before it.
    assert.ok(!r.extrema.some((e) => e.kind === 'valley'), JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])));
    const end = (r.rejected ?? []).find((x) => x.band === 2 && near(x.k, [0.5, 0.5, 0]));
    assert.equal(end?.reason, 'boundary', JSON.stringify(r.rejected));
    // The "V" of band 3 where the parabolas cross is a crossing, though it falls between sampled points.
    const v = (r.rejected ?? []).find((x) => x.band === 3);
    assert.equal(v?.reason, 'crossing', JSON.stringify(r.rejected));
    assert.match(v.detail, /between sampled points/);
  });
});

describe('candidate classification: rounding of the written energies', () => {
  // Cosine bands E = e0 + 2t Σ(1 − cos 2πk_i) (nearest-neighbour tight binding, analytic) on a 20 001-point
  // path Γ–X–M–Γ, rounded to 4 and to 6 decimals as files write them. On this path the true extrema within
  // the range are: valence maximum at Γ (t < 0), conduction minimum at Γ (t > 0), and a second conduction band
  // (t < 0) whose path minimum is M. X is a saddle of every band here, M a maximum of the first conduction
  // band (not a valley). Nothing else.
  const bands = [cosineBand(0, [-0.3, -0.3, -0.3]), cosineBand(1.5, [0.1, 0.1, 0.1]), cosineBand(3.4, [-0.1, -0.1, -0.1])];
  for (const decimals of [4, 6]) {
    it(`written with ${decimals} decimals: exactly VBM and CBM at Γ and the second band's valley at M`, function () {
      this.timeout(30000);
      const bs = pathModel({
        lattice: cubicLattice(3.2),
        bands,
        electrons: 2,
        legs: [[G, X, M, G]],
        pointsPerSegment: 6667,
        roundTo: 10 ** -decimals,
      });
      assert.ok(bs.nk >= 20000);
      const r = analyzeBandStructure(bs, { range_eV: 1.4 });
      const got = r.extrema.map((e) => `${e.kind} b${e.band} ${e.label}`).sort();
      assert.deepEqual(got, ['cbm b2 Γ', 'valley b3 M', 'vbm b1 Γ'].sort(), JSON.stringify(r.extrema.map((e) => [e.kind, e.band, e.k])));
      for (const e of r.extrema) {
        const truth: Vec3 = e.kind === 'valley' ? [0.5, 0.5, 0] : [0, 0, 0];
        assert.ok(near(e.k, truth, 1e-12), `${e.kind} at ${e.k}`);
      }
      // Only saddles (at X) may be set aside; no rounding artefact is a candidate of another kind.
      for (const x of r.rejected ?? []) assert.ok(x.reason === 'saddle' && near(x.k, [0.5, 0, 0]), JSON.stringify(x));
    });
  }

  it('a flat top written as several equal values is one maximum, at the middle of the plateau', () => {
    // A quartic-flat valence top E = −c (kx − k0)^4 rounded to 4 decimals: many equal values around k0 =
    // 0.3 of Γ–X; the analytic maximum is k0 (a sampled point, the plateau's centre by symmetry).
    const k0 = 0.3;
    const flatTop: Dispersion = (kc) => -50 * (kc[0] - kx(k0)) ** 4;
    const bs = pathModel({
      lattice: cubicLattice(A),
      bands: [flatTop, parabolicBand(3, 1)],
      electrons: 2,
      legs: [[G, X]],
      pointsPerSegment: 201,
      roundTo: 1e-4,
    });
    const r = analyzeBandStructure(bs);
    const tops = r.extrema.filter((e) => e.kind === 'vbm' || e.kind === 'peak');
    assert.equal(tops.length, 1, JSON.stringify(tops.map((e) => [e.kind, e.k])));
    assert.ok(Math.abs(tops[0]!.k[0] - k0) < 1e-9, String(tops[0]!.k));
  });
});
