import assert from 'node:assert/strict';
import fc from 'fast-check';
import type { Mat3, Structure, Vec3 } from '../../../src/core/model';
import { AnalysisError } from '../../../src/core/errors';
import {
  crystalSymmetry,
  ensureSymmetryReady,
  equivalentK,
  starOfK,
  symmetryReady,
  valleyDegeneracy,
} from '../../../src/core/lattice/symmetry';
import { det3, mat3Inverse, mulMat, transpose3 } from '../../../src/core/lattice/linalg';
import { anyCellChange, diamondConventional, diamondLike, redescribe, redescribeK, wurtzite } from './crystals';

// Lattice constants, Å (memory; e.g. Kittel, Introduction to Solid State Physics, ch. 1): the symmetry does
// not depend on them.
const A_SI = 5.431;
const A_GE = 5.658;
const A_GAAS = 5.653;

// Special points of the fcc Brillouin zone in the primitive reciprocal basis of a1=(0,a/2,a/2),
// a2=(a/2,0,a/2), a3=(a/2,a/2,0) (Setyawan & Curtarolo, Comput. Mater. Sci. 49, 299 (2010), FCC table).
const G: Vec3 = [0, 0, 0];
const X: Vec3 = [0.5, 0, 0.5];
const L: Vec3 = [0.5, 0.5, 0.5];
const W: Vec3 = [0.5, 0.25, 0.75];
const K: Vec3 = [0.375, 0.375, 0.75];
const U: Vec3 = [0.625, 0.25, 0.625];
/** Si conduction minimum about 85 % of the way from Γ to X (physics.md; Cohen & Bergstresser 1966). */
const DELTA: Vec3 = [0.85 * 0.5, 0, 0.85 * 0.5];

/** Expected star sizes modulo G in an fcc crystal with full cubic symmetry on k (Oh, or Td with time reversal). */
const FCC_STARS: [string, Vec3, number][] = [
  // Γ is its own star.
  ['Γ', G, 1],
  // Truncated-octahedron geometry (common practice): 6 square faces centred on X, each shared with one
  // neighbouring zone → 6/2 = 3 distinct X points.
  ['X', X, 3],
  // 8 hexagonal faces centred on L, each shared by 2 zones → 8/2 = 4 (Ge's four L valleys).
  ['L', L, 4],
  // Δ on the six ⟨100⟩ axes, strictly inside the zone → 6 (Si's six valleys; N_v = 6, Sze & Ng (memory)).
  ['Δ', DELTA, 6],
  // 24 vertices (W); 4 zones meet at each vertex of the fcc zone tiling → 24/4 = 6.
  ['W', W, 6],
  // 36 edges (12 hexagon–hexagon with midpoint K, 24 hexagon–square with midpoint U), 3 zones meet at each
  // edge, and K ≡ U modulo G → 36/3 = 12 for both.
  ['K', K, 12],
  ['U', U, 12],
  // A general point: 48 operations of Oh (International Tables Vol. A, m-3m has order 48).
  ['general', [0.11, 0.23, 0.37], 48],
];

describe('crystal symmetry (moyo-wasm)', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('loads the symmetry module once and reports readiness', async () => {
    assert.equal(symmetryReady(), true);
    await ensureSymmetryReady(); // a second call is harmless
    assert.equal(symmetryReady(), true);
  });

  it('finds Fd-3m (227) with 48 operations for diamond Si and Ge', () => {
    for (const [name, a] of [
      ['Si', A_SI],
      ['Ge', A_GE],
    ] as const) {
      const s = crystalSymmetry(diamondLike(a, name, name));
      // International Tables for Crystallography Vol. A: diamond is Fd-3m, No. 227; its point group m-3m has
      // order 48, so a primitive cell has 48 operations.
      assert.equal(s.spaceGroup, 227, name);
      assert.equal(s.rotations.length, 48, name);
      assert.equal(s.translations.length, 48, name);
      assert.equal(s.pointGroup.length, 48, name);
      assert.match(s.hmSymbol.replace(/\s/g, ''), /^Fd-3m$/);
      assert.equal(s.bravaisClass, 'cF');
      assert.equal(s.centrosymmetric, true);
      assert.equal(s.latticePointsPerCell, 1);
    }
  });

  it('gives structures with the same cell the same operations, and a cell that differs its own (results kept by cell)', () => {
    const first = crystalSymmetry(diamondLike(A_SI, 'Si', 'Si'));
    // A second object with equal content (another run of the same crystal): equal operations, its own lattice.
    const again = diamondLike(A_SI, 'Si', 'Si');
    const second = crystalSymmetry(again);
    assert.equal(second.spaceGroup, 227); // International Tables Vol. A: diamond, Fd-3m
    assert.deepEqual(second.rotations, first.rotations);
    assert.equal(second.lattice, again.lattice);
    // The second atom moved by 0.002 along the body diagonal (about 0.019 Å, more than the 1e-3 Å tolerance):
    // the inversion between the two atoms is lost, so fewer than the 48 operations of m-3m remain
    // (International Tables Vol. A: order of m-3m 48). The kept result of the undistorted cell must not answer.
    const moved: Structure = { ...again, positions: new Float64Array([0, 0, 0, 0.252, 0.252, 0.252]) };
    assert.ok(crystalSymmetry(moved).rotations.length < 48);
    // The same cell with a tolerance larger than the displacement: the full group again (the tolerance is part of the key).
    const loose = crystalSymmetry({ ...moved, positions: new Float64Array(moved.positions) }, 0.1);
    assert.equal(loose.rotations.length, 48);
  });

  it('finds F-43m (216) with 24 operations for zincblende GaAs', () => {
    const s = crystalSymmetry(diamondLike(A_GAAS, 'Ga', 'As'));
    // International Tables Vol. A: zincblende is F-43m, No. 216; point group -43m has order 24.
    assert.equal(s.spaceGroup, 216);
    assert.equal(s.rotations.length, 24);
    assert.match(s.hmSymbol.replace(/\s/g, ''), /^F-43m$/);
    assert.equal(s.centrosymmetric, false);
  });

  it('finds P6_3mc (186) with 12 operations for wurtzite', () => {
    // International Tables Vol. A: wurtzite (e.g. ZnO, GaN) is P6_3mc, No. 186; point group 6mm, order 12.
    // a, c, u for ZnO (memory): 3.25 Å, 5.21 Å, 0.382.
    const s = crystalSymmetry(wurtzite(3.25, 5.21, 0.382, 'Zn', 'O'));
    assert.equal(s.spaceGroup, 186);
    assert.equal(s.rotations.length, 12);
    assert.equal(s.bravaisClass, 'hP');
  });

  it('maps every atom onto an atom of the same species under each operation (x → W x + t)', () => {
    // Definition of a space-group operation (International Tables Vol. A); checks the matrix layout.
    for (const st of [diamondLike(A_GAAS, 'Ga', 'As'), wurtzite(3.25, 5.21, 0.382, 'Zn', 'O')]) {
      const s = crystalSymmetry(st);
      const n = st.species.length;
      s.rotations.forEach((w, o) => {
        const t = s.translations[o]!;
        for (let i = 0; i < n; i++) {
          const x = [0, 1, 2].map(
            (r) => w[r]![0] * st.positions[3 * i]! + w[r]![1] * st.positions[3 * i + 1]! + w[r]![2] * st.positions[3 * i + 2]! + t[r]!,
          );
          const hit = [...Array(n).keys()].some(
            (j) =>
              st.species[j] === st.species[i] &&
              [0, 1, 2].every((c) => Math.abs(((((x[c]! - st.positions[3 * j + c]! + 0.5) % 1) + 1) % 1) - 0.5) < 1e-6),
          );
          assert.ok(hit, `operation ${o} sends atom ${i} nowhere`);
        }
        // A rotation preserves the metric: Wᵀ g W = g with g = A Aᵀ (definition of a lattice symmetry).
        const g = mulMat(st.lattice, transpose3(st.lattice));
        const wgw = mulMat(mulMat(transpose3(w), g), w);
        for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) assert.ok(Math.abs(wgw[r]![c]! - g[r]![c]!) < 1e-6);
      });
    }
  });

  it('counts 192 operations (48 rotations × 4 centring translations) in the conventional cell of diamond', () => {
    // International Tables Vol. A: the F-centred conventional cell holds 4 lattice points; 4 × 48 = 192.
    const s = crystalSymmetry(diamondConventional(A_SI, 'Si'));
    assert.equal(s.spaceGroup, 227);
    assert.equal(s.rotations.length, 192);
    assert.equal(s.pointGroup.length, 48);
    assert.equal(s.latticePointsPerCell, 4);
    // The F-centring vectors (0,½,½), (½,0,½), (½,½,0) (International Tables Vol. A).
    const key = (v: Vec3): string => v.map((x) => x.toFixed(3)).join(',');
    assert.deepEqual(s.centringTranslations.map(key).sort(), ['0.000,0.500,0.500', '0.500,0.000,0.500', '0.500,0.500,0.000']);
  });

  it('counts valleys in the crystal zone also when the run used the conventional cubic cell', () => {
    // In the conventional cell's reciprocal basis fractional k equals cartesian k in units of 2π/a, so the fcc
    // points are X (0,1,0), L (½,½,½), W (½,1,0), K (¾,¾,0), U (¼,1,¼), Δ (0,0.85,0) (common practice).
    // The counts are the crystal's (as for the primitive cell, FCC_STARS), not those of the cubic cell's folded
    // zone, where all four L would fold onto one point.
    const s = crystalSymmetry(diamondConventional(A_GE, 'Ge'));
    const conv: [string, Vec3, number][] = [
      ['Γ', [0, 0, 0], 1],
      ['X', [0, 1, 0], 3],
      ['L', [0.5, 0.5, 0.5], 4],
      ['Δ', [0, 0.85, 0], 6],
      ['W', [0.5, 1, 0], 6],
      ['K', [0.75, 0.75, 0], 12],
      ['U', [0.25, 1, 0.25], 12],
    ];
    for (const [name, k, n] of conv) assert.equal(valleyDegeneracy(s, k), n, name);
    assert.ok(!equivalentK(s, [0, 1, 0], [0, 0, 0])); // X is not Γ in the crystal, though it is in the cubic cell's zone
  });

  it('gives the fcc star sizes modulo G for Si (Oh) and for GaAs (Td with time reversal)', () => {
    for (const st of [diamondLike(A_SI, 'Si', 'Si'), diamondLike(A_GAAS, 'Ga', 'As')]) {
      const s = crystalSymmetry(st);
      for (const [name, k, n] of FCC_STARS) {
        assert.equal(starOfK(s, k).length, n, `${s.hmSymbol} ${name}`);
        assert.equal(valleyDegeneracy(s, k), n, `${s.hmSymbol} ${name}`);
      }
    }
  });

  it('includes time reversal: without it a general point of zincblende would have only 24 images', () => {
    // -43m has 24 operations (International Tables Vol. A); with k → −k the star of a general point doubles.
    const s = crystalSymmetry(diamondLike(A_GAAS, 'Ga', 'As'));
    const k: Vec3 = [0.11, 0.23, 0.37];
    assert.equal(starOfK(s, k).length, 48);
    assert.ok(equivalentK(s, k, [-0.11, -0.23, -0.37]));
  });

  it('returns star members that are images of k and pairwise distinct modulo G, k first', () => {
    const s = crystalSymmetry(diamondLike(A_SI, 'Si', 'Si'));
    const star = starOfK(s, L);
    assert.deepEqual(star[0], L);
    for (let i = 0; i < star.length; i++) {
      assert.ok(equivalentK(s, L, star[i]!));
      for (let j = 0; j < i; j++) {
        const d = star[i]!.map((x, c) => x - star[j]![c]!);
        assert.ok(
          d.some((x) => Math.abs(x - Math.round(x)) > 1e-6),
          'two members equal modulo G',
        );
      }
    }
  });

  it('gives the hexagonal star sizes modulo G for wurtzite', () => {
    const s = crystalSymmetry(wurtzite(3.25, 5.21, 0.382, 'Zn', 'O'));
    // Hexagonal zone geometry (common practice): 6 corners K, 3 zones meet at each → 2 (K and K');
    // 6 edge midpoints M, each shared by 2 zones → 3; A = (0,0,1/2) ≡ −A → 1.
    // Points in the basis a1=(a/2,−a√3/2,0), a2=(a/2,a√3/2,0) (Setyawan & Curtarolo 2010, HEX table).
    assert.equal(valleyDegeneracy(s, [1 / 3, 1 / 3, 0]), 2);
    assert.equal(valleyDegeneracy(s, [0.5, 0, 0]), 3);
    assert.equal(valleyDegeneracy(s, [0, 0, 0.5]), 1);
    assert.equal(valleyDegeneracy(s, [0, 0, 0]), 1);
  });

  it('says when a fitted point near L is merged only with a looser tolerance', () => {
    const s = crystalSymmetry(diamondLike(A_GE, 'Ge', 'Ge'));
    const nearL: Vec3 = [0.5 + 2e-4, 0.5 - 1e-4, 0.5];
    // Exactly at L: 4 (above). 2e-4 away the images no longer coincide at the default tolerance 1e-5 ...
    assert.ok(valleyDegeneracy(s, nearL) > 4);
    // ... and do at 1e-3 (fractional), as a caller with a noisy fitted vertex would ask.
    assert.equal(valleyDegeneracy(s, nearL, 1e-3), 4);
  });

  it('tells symmetry-equivalent points apart from inequivalent ones', () => {
    const s = crystalSymmetry(diamondLike(A_SI, 'Si', 'Si'));
    assert.ok(equivalentK(s, X, [0.5, 0.5, 0])); // another X (2π/a along z vs y)
    assert.ok(equivalentK(s, X, [0.5, 0, -0.5])); // equal to an X modulo G
    assert.ok(equivalentK(s, K, U)); // K ≡ U modulo G (see FCC_STARS)
    assert.ok(!equivalentK(s, X, L));
    assert.ok(!equivalentK(s, DELTA, X));
    assert.ok(!equivalentK(s, W, K));
  });

  it('gives the same group and star sizes for any primitive cell, rotated (property)', () => {
    const base = diamondLike(A_SI, 'Si', 'Si');
    fc.assert(
      fc.property(anyCellChange, ({ M, Q }: { M: Mat3; Q: Mat3 }) => {
        const st: Structure = redescribe(base, M, Q);
        const s = crystalSymmetry(st);
        assert.equal(s.spaceGroup, 227);
        assert.equal(s.rotations.length, 48);
        for (const [name, k, n] of FCC_STARS) assert.equal(valleyDegeneracy(s, redescribeK(M, k)), n, name);
      }),
      { seed: 20101, numRuns: 25 },
    );
  });

  it('acts on k with the inverse transpose of the real-space rotation', () => {
    // k·x is invariant: ((W⁻¹)ᵀ k)·(W x) = k·x (definition of the reciprocal action).
    const s = crystalSymmetry(wurtzite(3.25, 5.21, 0.382, 'Zn', 'O'));
    s.pointGroup.forEach((w, i) => {
      const r = s.reciprocalPointGroup[i]!;
      const prod = mulMat(transpose3(r), w);
      for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) assert.equal(prod[a]![b], a === b ? 1 : 0);
      assert.equal(Math.abs(det3(r)), 1);
    });
    assert.ok(mat3Inverse(s.lattice));
  });

  it('throws an AnalysisError with a plain sentence for impossible structures', () => {
    const bad: Structure = {
      lattice: [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 0],
      ],
      species: ['Si'],
      positions: new Float64Array([0, 0, 0]),
    };
    assert.throws(
      () => crystalSymmetry(bad),
      (e: unknown) => e instanceof AnalysisError && /span no volume/.test(e.message),
    );
    const empty: Structure = {
      lattice: [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
      species: [],
      positions: new Float64Array(0),
    };
    assert.throws(
      () => crystalSymmetry(empty),
      (e: unknown) => e instanceof AnalysisError && /no atoms/.test(e.message),
    );
    const mismatch: Structure = {
      lattice: [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
      species: ['Si', 'Si'],
      positions: new Float64Array([0, 0, 0]),
    };
    assert.throws(
      () => crystalSymmetry(mismatch),
      (e: unknown) => e instanceof AnalysisError && /2 atoms but 1 positions/.test(e.message),
    );
    const overlap: Structure = {
      lattice: [
        [3, 0, 0],
        [0, 3, 0],
        [0, 0, 3],
      ],
      species: ['Si', 'Si'],
      positions: new Float64Array([0, 0, 0, 0, 0, 1e-9]),
    };
    // Two Si atoms 3e-9 Å apart: the library refuses the cell; the message is one sentence naming the cell.
    assert.throws(
      () => crystalSymmetry(overlap),
      (e: unknown) =>
        e instanceof AnalysisError && /crystal symmetry of the structure \(Si2, 2 atoms\)/.test(e.message) && !/\n/.test(e.message),
    );
  });
});
