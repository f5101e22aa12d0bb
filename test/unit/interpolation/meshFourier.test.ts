import assert from 'node:assert/strict';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { crystalSymmetry, ensureSymmetryReady, type CrystalSymmetry } from '../../../src/core/lattice/symmetry';
import { reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { irreducibleMesh, recogniseMesh } from '../../../src/core/interpolation/regularMesh';
import { buildStarBasis, starValues } from '../../../src/core/interpolation/starBasis';
import { SmoothStarFit, toCartesian } from '../../../src/core/interpolation/smoothFit';
import { meshKernelSpectrum, meshTransform } from '../../../src/core/interpolation/meshFourier';

// The fast paths of the smoothness-constrained star fit (Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721
// (1988)) checked against the fit's definition computed directly: star values at each data point, the matrix
// H = Σ_m S_m(k_i) S_m(k_j)/ρ_m summed over the stars, and a fresh fit of the reduced data for leave-one-out.
// Arbitrary data: any values must be fitted the same way by both.

const h = 2.715;
const diamond: Mat3 = [
  [0, h, h],
  [h, 0, h],
  [h, h, 0],
];
const cubic: Mat3 = [
  [3, 0, 0],
  [0, 3, 0],
  [0, 0, 3],
];

function setUp(lattice: Mat3, sym: CrystalSymmetry, n: number, shift: number, starsPerPoint: number) {
  const { kpoints, weights } = irreducibleMesh([n, n, n], [shift, shift, shift], sym.reciprocalPointGroup);
  const rec = recogniseMesh(kpoints, weights, sym.reciprocalPointGroup);
  assert.ok(rec.mesh, rec.reason ?? '');
  const nk = kpoints.length / 3;
  const basis = buildStarBasis(lattice, sym.pointGroup, starsPerPoint * nk);
  const kCart = toCartesian(kpoints, reciprocalLattice(lattice));
  const energies = Float64Array.from({ length: nk }, (_, i) => Math.sin(1.3 * i) + 0.2 * i);
  return { kpoints, mesh: rec.mesh, nk, basis, kCart, energies };
}

function maxDifference(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
  return worst;
}

describe('star fit on a mesh by Fourier sums: the same fit as the direct definition', function () {
  this.timeout(60000);
  before(async () => {
    await ensureSymmetryReady();
  });

  for (const [name, lattice, species, positions, n, shift] of [
    ['diamond, Γ-centred 8×8×8', diamond, ['Si', 'Si'], [0, 0, 0, 0.25, 0.25, 0.25], 8, 0],
    ['simple cubic, shifted 6×6×6', cubic, ['X'], [0, 0, 0], 6, 0.5],
  ] as const) {
    it(`${name}: coefficients of the fit and of every leave-one-out refit agree with the direct sums`, () => {
      const sym = crystalSymmetry({ lattice, species: [...species], positions: new Float64Array(positions) });
      const { kpoints, mesh, nk, basis, kCart, energies } = setUp(lattice, sym, n, shift, 6);
      const direct = new SmoothStarFit(basis, kCart);
      const fourier = new SmoothStarFit(basis, kCart, { mesh, kFrac: kpoints });
      // Six stars per point hold every frequency of the mesh: the system is solved in Fourier space.
      assert.ok(meshKernelSpectrum(basis, mesh));
      assert.equal(direct.onMesh, false);
      assert.equal(fourier.onMesh, true);
      for (const exclude of [null, 0, 1, nk - 1]) {
        const a = direct.fit(energies, exclude).coefficients;
        const b = fourier.fit(energies, exclude).coefficients;
        // Same linear algebra up to rounding: the sums differ only in the order of additions.
        assert.ok(maxDifference(a, b) < 1e-8, `exclude ${exclude}: ${maxDifference(a, b)}`);
      }
    });
  }

  it('a basis too small to hold every mesh frequency: not solved in Fourier space, and singular by the direct sums', () => {
    const sym = crystalSymmetry({ lattice: cubic, species: ['X'], positions: new Float64Array([0, 0, 0]) });
    const { mesh, basis, kCart, energies } = setUp(cubic, sym, 6, 0.5, 1.2);
    // Fewer lattice vectors than mesh points: some frequency has none; a symmetrised plane wave of that
    // frequency is then orthogonal on the mesh to every star function, so no fit passes through every value.
    assert.ok(basis.size.reduce((s, x) => s + x, 0) < mesh.total);
    assert.equal(meshKernelSpectrum(basis, mesh), null);
    assert.throws(() => new SmoothStarFit(basis, kCart).fit(energies), /singular/);
  });

  it('leave-one-out from the one factorisation equals a fresh fit of the data without that point', () => {
    const sym = crystalSymmetry({ lattice: diamond, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const { kpoints, mesh, nk, basis, kCart, energies } = setUp(diamond, sym, 6, 0, 8);
    const fit = new SmoothStarFit(basis, kCart, { mesh, kFrac: kpoints });
    for (const p of [0, 2, nk - 1]) {
      const keep = Array.from({ length: nk }, (_, i) => i).filter((i) => i !== p);
      const reducedK = Float64Array.from(keep.flatMap((i) => [kCart[3 * i]!, kCart[3 * i + 1]!, kCart[3 * i + 2]!]));
      // The minimiser of the roughness under the kept constraints is unique: a fresh fit must give it.
      const fresh = new SmoothStarFit(basis, reducedK).fit(Float64Array.from(keep, (i) => energies[i]!));
      const left = fit.fit(energies, p);
      const d = maxDifference(fresh.coefficients, left.coefficients);
      assert.ok(d < 1e-8, `point ${p}: ${d}`);
      // And it is not exact at the point left out (arbitrary data carry information there).
      const kp: Vec3 = [kCart[3 * p]!, kCart[3 * p + 1]!, kCart[3 * p + 2]!];
      assert.ok(Math.abs(left.value(kp) - energies[p]!) > 1e-6);
    }
    // Changing the energies in place is noticed (the band's solution is not reused).
    const before = fit.fit(energies).value([0.1, 0.2, 0.3]);
    energies[3] = energies[3]! + 0.5;
    assert.notEqual(fit.fit(energies).value([0.1, 0.2, 0.3]), before);
  });

  it('the interpolant by per-axis phase tables equals the direct star sum at arbitrary k', () => {
    const sym = crystalSymmetry({ lattice: diamond, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const { kpoints, mesh, basis, kCart, energies } = setUp(diamond, sym, 6, 0, 8);
    const interp = new SmoothStarFit(basis, kCart, { mesh, kFrac: kpoints }).fit(energies);
    for (const k of [
      [0.13, -0.41, 0.77],
      [1.9, 0.2, -2.3],
    ] as Vec3[]) {
      const s = starValues(basis, k);
      let direct = 0;
      for (let m = 0; m < basis.count; m++) direct += interp.coefficients[m]! * s[m]!;
      assert.ok(Math.abs(interp.value(k) - direct) < 1e-9, `${interp.value(k)} vs ${direct}`);
      assert.ok(Math.abs(interp.derivatives(k).value - direct) < 1e-9);
    }
  });

  it('the star basis holds every lattice vector up to its last radius, in whole stars', () => {
    const sym = crystalSymmetry({ lattice: diamond, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) });
    const basis = buildStarBasis(diamond, sym.pointGroup, 200);
    // Brute force: count the lattice vectors shorter than the last star's radius.
    const rLast = basis.radius[basis.count - 1]!;
    let inside = 0;
    for (let i = -12; i <= 12; i++) {
      for (let j = -12; j <= 12; j++) {
        for (let l = -12; l <= 12; l++) {
          const r = [0, 1, 2].map((x) => i * diamond[0][x]! + j * diamond[1][x]! + l * diamond[2][x]!);
          if (Math.hypot(...r) < rLast - 1e-9) inside++;
        }
      }
    }
    let counted = 0;
    for (let m = 0; m < basis.count; m++) {
      if (basis.radius[m]! < rLast - 1e-9) counted += basis.size[m]!;
      // One of each ±R pair is kept; integer and cartesian members agree.
      const kept = basis.start[m + 1]! - basis.start[m]!;
      assert.equal(kept, m === 0 ? 1 : basis.size[m]! / 2);
      for (let q = basis.start[m]!; q < basis.start[m + 1]!; q++) {
        const z = [0, 1, 2].map((a) => basis.integer[3 * q + a]!);
        for (let x = 0; x < 3; x++) {
          const c = z[0]! * diamond[0][x]! + z[1]! * diamond[1][x]! + z[2]! * diamond[2][x]!;
          assert.ok(Math.abs(c - basis.members[3 * q + x]!) < 1e-12);
        }
        assert.ok(
          Math.abs(Math.hypot(basis.members[3 * q]!, basis.members[3 * q + 1]!, basis.members[3 * q + 2]!) - basis.radius[m]!) < 1e-9,
        );
      }
    }
    assert.equal(counted, inside);
  });

  it('the mesh transform is the discrete Fourier transform (direct sum at a few points)', () => {
    const dims: [number, number, number] = [4, 6, 3];
    const total = 72;
    const x = Float64Array.from({ length: total }, (_, i) => Math.cos(0.7 * i) + 0.1 * i);
    const re = x.slice();
    const im = new Float64Array(total);
    meshTransform(re, im, dims);
    for (const p of [0, 5, 37, 71]) {
      const p1 = Math.floor(p / 18);
      const p2 = Math.floor(p / 3) % 6;
      const p3 = p % 3;
      let sr = 0;
      let si = 0;
      for (let j = 0; j < total; j++) {
        const j1 = Math.floor(j / 18);
        const j2 = Math.floor(j / 3) % 6;
        const j3 = j % 3;
        const phase = 2 * Math.PI * ((p1 * j1) / 4 + (p2 * j2) / 6 + (p3 * j3) / 3);
        sr += x[j]! * Math.cos(phase);
        si += x[j]! * Math.sin(phase);
      }
      assert.ok(Math.abs(re[p]! - sr) < 1e-10 && Math.abs(im[p]! - si) < 1e-10, `${p}`);
    }
  });
});
