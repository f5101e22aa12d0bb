import assert from 'node:assert/strict';
import { eigs } from 'mathjs';
import fc from 'fast-check';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { symmetricEigen3 } from '../../../src/core/analysis/symmetricEigen';
import { planTensorRun } from '../../../src/core/lattice/tensorKpoints';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { mulMatVec } from '../../../src/core/lattice/linalg';
import type { ExtremumReport, Mat3, Vec3 } from '../../../src/core/model';
import {
  cosineBand,
  cosineMass,
  diamondStructure,
  ellipsoidalValley,
  fccLattice,
  gridModel,
  orthorhombicLattice,
  parabolicBand,
  pathModel,
  pointsModel,
  rotateLattice,
  rotation,
} from '../../support/models';

const cbmOf = (r: { extrema: ExtremumReport[] }): ExtremumReport => r.extrema.find((e) => e.kind === 'cbm')!;
const parallel = (a: Vec3, b: Vec3): boolean => Math.abs(Math.abs(a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) - 1) < 1e-6;

describe('symmetric 3×3 eigen-decomposition', () => {
  it('agrees with mathjs eigs (a general-purpose reference library) on random symmetric matrices', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 6, maxLength: 6 }), (v) => {
        const m: Mat3 = [
          [v[0]!, v[3]!, v[4]!],
          [v[3]!, v[1]!, v[5]!],
          [v[4]!, v[5]!, v[2]!],
        ];
        const ours = symmetricEigen3(m);
        const ref = (eigs(m).values as number[]).slice().sort((a, b) => a - b);
        ours.values.forEach((x, i) => assert.ok(Math.abs(x - ref[i]!) < 1e-9 * (1 + Math.abs(x))));
        // Each vector is a unit eigenvector: |M v − λ v| small.
        ours.vectors.forEach((u, i) => {
          const mu = mulMatVec(m, u);
          assert.ok(Math.hypot(mu[0] - ours.values[i]! * u[0], mu[1] - ours.values[i]! * u[1], mu[2] - ours.values[i]! * u[2]) < 1e-9 * 30);
        });
      }),
      { seed: 20261201, numRuns: 200 },
    );
  });
});

describe('mass tensor from off-path k-points', () => {
  // Orthorhombic three-axis cosine band: masses ħ²/(2 t_i a_i²) along the crystal axes (analytic).
  const a: Vec3 = [3.1, 4.2, 5.3];
  const t: Vec3 = [0.9, 0.5, 0.3];
  const expected = [0, 1, 2].map((i) => cosineMass(t[i]!, a[i]!));
  const lattice = orthorhombicLattice(...a);

  function tensorRun(lat: Mat3): ReturnType<typeof analyzeBandStructure> {
    // Every point of the two-shell plan (no structure given, so no symmetry reduction).
    const plan = planTensorRun([0, 0, 0], 0.004, lat, null, false);
    return analyzeBandStructure(
      pointsModel({ lattice: lat, bands: [cosineBand(-2, [-0.2, -0.2, -0.2]), cosineBand(1, t)], electrons: 2, kpoints: plan.allPoints }),
    );
  }

  it('recovers the principal masses and axes of the orthorhombic model from a two-shell tensor run', () => {
    const cbm = cbmOf(tensorRun(lattice));
    assert.ok(cbm.tensor, JSON.stringify(cbm.warnings));
    assert.equal(cbm.tensor.points, 37); // centre + 2 shells × 18 directions
    const axes: Vec3[] = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    for (let i = 0; i < 3; i++) {
      const j = cbm.tensor.axes.findIndex((ax) => parallel(ax, axes[i]!));
      assert.ok(j >= 0, `axis ${i} not found`);
      // Central-4 truncation ~ (k a)⁴/90 < 1e-6 at k = 0.004 Å⁻¹ (analytic Taylor series of cos).
      assert.ok(Math.abs(cbm.tensor.principal[j]! / expected[i]! - 1) < 1e-4, `${cbm.tensor.principal[j]} vs ${expected[i]}`);
    }
  });

  it('recovers the same masses, with rotated axes, after rotating the lattice', () => {
    const q = rotation([1, 2, 3], 0.7);
    const cbm = cbmOf(tensorRun(rotateLattice(lattice, q)));
    const axes: Vec3[] = [
      [q[0][0], q[1][0], q[2][0]],
      [q[0][1], q[1][1], q[2][1]],
      [q[0][2], q[1][2], q[2][2]],
    ];
    for (let i = 0; i < 3; i++) {
      const j = cbm.tensor!.axes.findIndex((ax) => parallel(ax, axes[i]!));
      assert.ok(j >= 0, `rotated axis ${i} not found`);
      assert.ok(Math.abs(cbm.tensor!.principal[j]! / expected[i]! - 1) < 1e-4); // analytic
    }
  });

  it('recovers them from a uniform grid over the zone within the grid stencil error', () => {
    const bs = gridModel({ lattice, bands: [cosineBand(-2, [-0.2, -0.2, -0.2]), cosineBand(1, t)], electrons: 2, dims: [24, 24, 24] });
    const cbm = cbmOf(analyzeBandStructure(bs));
    assert.ok(cbm.tensor);
    const principal = [...cbm.tensor.principal].sort((x, y) => x - y);
    const exp = [...expected].sort((x, y) => x - y);
    // The nearest 19 points of this non-cubic grid reach two steps along the densest axis; the curvature of
    // cos over n steps x = 2π/24 is off by about (n x)²/12: 0.6 % at one step, 2.3 % at two (analytic).
    principal.forEach((m, i) => assert.ok(Math.abs(m / exp[i]! - 1) < 0.03, `${m} vs ${exp[i]}`));
  });
});

describe('extrema on a uniform grid', () => {
  it('finds a secondary valley on the grid (periodic neighbours) with its offset and tensor', () => {
    // Two periodic valleys: cosine minima at Γ (1.0 eV) and at (0.5, 0, 0) (1.2 eV), the band the lower of them.
    const t = 0.5;
    const atX = (_kc: Vec3, kf: Vec3): number =>
      1.2 +
      2 * t * (1 + Math.cos(2 * Math.PI * kf[0])) +
      2 * t * (1 - Math.cos(2 * Math.PI * kf[1])) +
      2 * t * (1 - Math.cos(2 * Math.PI * kf[2]));
    const gamma = cosineBand(1.0, [t, t, t]);
    const bs = gridModel({
      lattice: orthorhombicLattice(4, 4, 4),
      bands: [cosineBand(-2, [-0.2, -0.2, -0.2]), (kc, kf) => Math.min(gamma(kc, kf), atX(kc, kf))],
      electrons: 2,
      dims: [12, 12, 12],
    });
    const r = analyzeBandStructure(bs);
    const valleys = r.extrema.filter((e) => e.kind === 'valley');
    assert.equal(valleys.length, 1, JSON.stringify(valleys.map((v) => v.k)));
    assert.deepEqual(valleys[0]!.k, [0.5, 0, 0]);
    assert.ok(Math.abs(valleys[0]!.offset_eV - 0.2) < 1e-9); // model: 1.2 − 1.0 eV
    assert.ok(valleys[0]!.tensor);
    assert.equal(cbmOf(r).tensor!.principal.length, 3);
  });
});

describe('tensor and averaged masses of a Si-like Δ valley (diamond structure, symmetry from the structure)', () => {
  before(async () => {
    await ensureSymmetryReady();
  });
  const aSi = 5.43;
  const unit = (2 * Math.PI) / aSi;
  // fcc: X = (0.5, 0, 0.5) fractional = (2π/a)(0, 1, 0); a valley at 0.85 of Γ–X along y.
  const k0frac: Vec3 = [0.425, 0, 0.425];
  // Handbook masses (memory; Sze & Ng, Physics of Semiconductor Devices, 3rd ed.): m_l = 0.98, m_t = 0.19.
  const ml = 0.98;
  const mt = 0.19;
  const valley = ellipsoidalValley(1.1, [0, 0.85 * unit, 0], [0, 1, 0], ml, mt);

  it('a tensor run round trip gives m_l, m_t, N_v = 6, m_dos ≈ 1.08 and m_c ≈ 0.26 (Sze & Ng, memory)', () => {
    const lattice = fccLattice(aSi);
    const plan = planTensorRun(k0frac, 0.02, lattice, null, false);
    const bs = pointsModel({
      lattice,
      structure: diamondStructure(aSi, 'Si'),
      bands: [parabolicBand(0, -0.3), valley],
      electrons: 2,
      kpoints: plan.allPoints,
    });
    const cbm = cbmOf(analyzeBandStructure(bs));
    assert.equal(cbm.valleyDegeneracy, 6); // six Δ valleys (physics.md step 8)
    assert.ok(cbm.tensor);
    const sorted = [...cbm.tensor.principal].sort((x, y) => x - y);
    assert.ok(Math.abs(sorted[0]! - mt) < 1e-6 && Math.abs(sorted[1]! - mt) < 1e-6 && Math.abs(sorted[2]! - ml) < 1e-6); // model input
    const j = cbm.tensor.principal.findIndex((m) => Math.abs(m - ml) < 1e-6);
    assert.ok(parallel(cbm.tensor.axes[j]!, [0, 1, 0]));
    // Handbook (memory, Sze & Ng): m_dos ≈ 1.08, m_c ≈ 0.26 for Si electrons.
    assert.ok(Math.abs(cbm.dosMass! - 1.08) < 0.01, String(cbm.dosMass));
    assert.ok(Math.abs(cbm.conductivityMass! - 0.26) < 0.005, String(cbm.conductivityMass));
    assert.ok(cbm.warnings.some((w) => /N_v = 6/.test(w)));
  });

  it('a path alone gives only the longitudinal mass at Δ: no tensor, and it says why', () => {
    const bs = pathModel({
      lattice: fccLattice(aSi),
      structure: diamondStructure(aSi, 'Si'),
      bands: [parabolicBand(0, -0.3), valley],
      electrons: 2,
      legs: [
        [
          { label: 'Γ', k: [0, 0, 0] },
          { label: 'X', k: [0.5, 0, 0.5] },
        ],
      ],
      pointsPerSegment: 40,
    });
    const cbm = cbmOf(analyzeBandStructure(bs));
    assert.equal(cbm.valleyDegeneracy, 6);
    assert.equal(cbm.tensor, null);
    assert.equal(cbm.dosMass, null);
    assert.ok(cbm.warnings.some((w) => /do not determine the 2 independent tensor components/.test(w)));
  });

  it('an L valley on Γ–L–W gets its tensor from the longitudinal and transverse path masses (little group of L)', () => {
    // Ge-like L valley with masses m_l = 1.6, m_t = 0.08 (handbook, memory; Sze & Ng) on a diamond lattice.
    const aGe = 5.66;
    const u = (2 * Math.PI) / aGe;
    const axis: Vec3 = [1 / Math.sqrt(3), 1 / Math.sqrt(3), 1 / Math.sqrt(3)];
    const L = ellipsoidalValley(0.7, [u / 2, u / 2, u / 2], axis, 1.6, 0.08);
    const bs = pathModel({
      lattice: fccLattice(aGe),
      structure: diamondStructure(aGe, 'Ge'),
      bands: [parabolicBand(0, -0.3), L],
      electrons: 2,
      legs: [
        [
          { label: 'Γ', k: [0, 0, 0] },
          { label: 'L', k: [0.5, 0.5, 0.5] },
          { label: 'W', k: [0.5, 0.25, 0.75] },
        ],
      ],
      pointsPerSegment: 60,
    });
    const cbm = cbmOf(analyzeBandStructure(bs));
    assert.equal(cbm.label, 'L');
    assert.equal(cbm.valleyDegeneracy, 4); // four L valleys (physics.md step 8)
    assert.ok(cbm.tensor, JSON.stringify(cbm.warnings));
    const sorted = [...cbm.tensor.principal].sort((x, y) => x - y);
    assert.ok(
      Math.abs(sorted[0]! - 0.08) < 1e-5 && Math.abs(sorted[1]! - 0.08) < 1e-5 && Math.abs(sorted[2]! - 1.6) < 1e-4,
      String(sorted),
    );
    // m_dos = 4^(2/3) (1.6 · 0.08²)^(1/3) and m_c = 3/(1/1.6 + 2/0.08) (the formulas of physics.md step 9).
    assert.ok(Math.abs(cbm.dosMass! - 4 ** (2 / 3) * Math.cbrt(1.6 * 0.08 * 0.08)) < 1e-4);
    assert.ok(Math.abs(cbm.conductivityMass! - 3 / (1 / 1.6 + 2 / 0.08)) < 1e-5);
  });
});
