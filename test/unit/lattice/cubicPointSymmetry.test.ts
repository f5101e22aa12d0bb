import assert from 'node:assert/strict';
import type { Mat3, Structure } from '../../../src/core/model';
import {
  analyzeStructure,
  crystalSymmetry,
  DEFAULT_SYMPREC,
  ensureSymmetryReady,
  latticeFromMoyo,
  operationSymmetry,
  valleyDegeneracy,
} from '../../../src/core/lattice/symmetry';
import { moyoSpaceGroupType } from '../../../src/core/lattice/moyoRuntime';
import { bravaisLattice } from '../../../src/core/lattice/bravais';
import { cubicBravais, cubicCrystalOperations } from '../../../src/core/lattice/cubicPointSymmetry';
import { diamondConventional, diamondLike, redescribe, rotationMatrix, UNIMODULAR, wurtzite } from './crystals';

// The operations found without the library are checked against the crystal-symmetry library (moyo, a general-purpose
// reference library) on the same structure: the same rotations, and translations equal modulo lattice vectors.
// Point-group orders: m-3m 48 (diamond Fd-3m, No. 227), -43m 24 (zincblende F-43m, No. 216), International Tables
// for Crystallography vol. A (physics.md check values).

const key = (m: Mat3): string => m.map((r) => r.join(',')).join(';');
const cubic = (a: number): Mat3 => [
  [a, 0, 0],
  [0, a, 0],
  [0, 0, a],
];

function sameAsLibrary(s: Structure, order: number): void {
  const ours = cubicCrystalOperations(s, DEFAULT_SYMPREC);
  assert.ok(ours, 'a clear cubic case is answered');
  const lib = crystalSymmetry(s);
  assert.equal(ours.rotations.length, order);
  assert.deepEqual(ours.rotations.map(key).sort(), lib.rotations.map(key).sort());
  // Each operation's translation, modulo a lattice vector, as the library gives it.
  ours.rotations.forEach((w, i) => {
    const j = lib.rotations.findIndex((r) => key(r) === key(w));
    const t = ours.translations[i]!;
    const u = lib.translations[j]!;
    for (let a = 0; a < 3; a++) {
      const d = t[a]! - u[a]!;
      assert.ok(Math.abs(d - Math.round(d)) < 1e-9, `translation of operation ${i}`);
    }
  });
}

describe('operations of a crystal on a cubic lattice without the library', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('diamond Si (fcc primitive cell): the 48 operations of m-3m, with the library translations', () => {
    sameAsLibrary(diamondLike(5.43, 'Si', 'Si'), 48);
  });

  it('zincblende GaAs: the 24 operations of -43m', () => {
    sameAsLibrary(diamondLike(5.65, 'Ga', 'As'), 24);
  });

  it('perovskite SrTiO3 (simple cubic, five atoms): 48', () => {
    // Sr at 0, Ti at the body centre, O at the face centres (common practice: the ideal cubic perovskite, Pm-3m).
    const s: Structure = {
      lattice: cubic(3.905),
      species: ['Sr', 'Ti', 'O', 'O', 'O'],
      positions: new Float64Array([0, 0, 0, 0.5, 0.5, 0.5, 0.5, 0.5, 0, 0.5, 0, 0.5, 0, 0.5, 0.5]),
    };
    sameAsLibrary(s, 48);
  });

  it('a cubic lattice with atoms of lower symmetry keeps only the operations that map them', () => {
    // Two species on a simple cubic lattice, the second off every symmetry element but a mirror: the crystal's
    // group is smaller than the lattice's, as the library finds it.
    const s: Structure = { lattice: cubic(4), species: ['A', 'B'], positions: new Float64Array([0, 0, 0, 0.1, 0.1, 0.3]) };
    const lib = crystalSymmetry(s);
    assert.ok(lib.rotations.length < 48);
    sameAsLibrary(s, lib.rotations.length);
  });

  it('the same crystal in other primitive vectors, rotated: still the library answer', () => {
    const q = rotationMatrix([1, 2, 3], 0.7);
    let answered = 0;
    for (const m of UNIMODULAR) {
      const s = redescribe(diamondLike(5.43, 'Si', 'Si'), m, q);
      const ours = cubicCrystalOperations(s, DEFAULT_SYMPREC);
      // Skewed cells may need entries beyond ±1: then no answer, never a wrong one.
      if (ours) {
        sameAsLibrary(s, 48);
        answered++;
      }
    }
    assert.ok(answered >= 2, `answered for ${answered} descriptions`);
  });

  it('leaves to the library what it cannot settle: conventional cells, other lattices, unclear distortions', () => {
    assert.equal(cubicCrystalOperations(diamondConventional(5.43, 'Si'), DEFAULT_SYMPREC), null, 'not primitive');
    assert.equal(cubicCrystalOperations(wurtzite(3.19, 5.19, 0.375, 'Ga', 'N'), DEFAULT_SYMPREC), null, 'hexagonal');
    // An atom moved by about the tolerance: neither clearly on nor clearly off the operations.
    const s = diamondLike(5.43, 'Ga', 'As');
    const nudged: Structure = { ...s, positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25 + DEFAULT_SYMPREC / 5.43]) };
    assert.equal(cubicCrystalOperations(nudged, DEFAULT_SYMPREC), null, 'unclear');
  });

  it('operationSymmetry gives the library valley counts and reads the space-group type from the library when asked', () => {
    for (const s of [diamondLike(5.43, 'Si', 'Si'), diamondLike(5.65, 'Ga', 'As')]) {
      const fast = operationSymmetry(s);
      const lib = crystalSymmetry(s);
      for (const k of [
        [0.5, 0, 0.5],
        [0.5, 0.5, 0.5],
        [0.425, 0, 0.425],
        [0.1, 0.2, 0.3],
      ] as const)
        assert.equal(valleyDegeneracy(fast, [...k]), valleyDegeneracy(lib, [...k]), `N_v at ${k.join(',')}`);
      assert.equal(fast.spaceGroup, lib.spaceGroup);
      assert.equal(fast.hmSymbol, lib.hmSymbol);
      assert.equal(fast.bravaisClass, 'cF');
      assert.deepEqual(fast.centringTranslations, []);
      assert.equal(fast.latticePointsPerCell, 1);
    }
  });
});

describe('the Bravais class of a cubic crystal without the library', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  // Reference: the library's Bravais class and conventional edge for the same cell (bravaisLattice's own path).
  const cells: [string, Structure][] = [
    ['diamond Si (cF)', diamondLike(5.43, 'Si', 'Si')],
    ['zincblende GaAs (cF)', diamondLike(5.65, 'Ga', 'As')],
    ['bcc Fe, one atom (cI)', { lattice: bccPrimitive(2.87), species: ['Fe'], positions: new Float64Array([0, 0, 0]) }],
    ['CsCl (cP)', { lattice: cubic(4.12), species: ['Cs', 'Cl'], positions: new Float64Array([0, 0, 0, 0.5, 0.5, 0.5]) }],
  ];
  for (const [name, s] of cells) {
    it(`${name}: the library's class and edge`, () => {
      const ours = cubicBravais(s, DEFAULT_SYMPREC);
      const lib = libraryBravaisOf(s);
      assert.ok(ours);
      assert.equal(ours.bravaisClass, lib.bravaisClass);
      for (const l of lib.lengths) assert.ok(Math.abs(ours.a - l) < 1e-9 * l, `edge ${ours.a} against ${l}`);
      const viaModule = bravaisLattice(s.lattice, s);
      assert.equal(viaModule.bravaisClass, lib.bravaisClass);
      assert.equal(viaModule.spaceGroup, lib.spaceGroup, 'the space group, read from the library when asked');
    });
  }

  it('a crystal of lower symmetry on a cubic lattice is left to the library', () => {
    const s: Structure = { lattice: cubic(4), species: ['A', 'B'], positions: new Float64Array([0, 0, 0, 0.1, 0.1, 0.3]) };
    assert.equal(cubicBravais(s, DEFAULT_SYMPREC), null);
    assert.notEqual(bravaisLattice(s.lattice, s).bravaisClass[0], 'c');
  });
});

/** bcc primitive vectors (−a/2, a/2, a/2), (a/2, −a/2, a/2), (a/2, a/2, −a/2) (common practice). */
function bccPrimitive(a: number): Mat3 {
  return [
    [-a / 2, a / 2, a / 2],
    [a / 2, -a / 2, a / 2],
    [a / 2, a / 2, -a / 2],
  ];
}

/** The library's answer: the dataset's space-group type and standard cell. */
function libraryBravaisOf(s: Structure): { bravaisClass: string; spaceGroup: number; lengths: number[] } {
  const d = analyzeStructure(s, DEFAULT_SYMPREC);
  const lat = latticeFromMoyo(d.std_cell.lattice.basis);
  return {
    bravaisClass: moyoSpaceGroupType(d.number).bravais_class,
    spaceGroup: d.number,
    lengths: lat.map((r) => Math.hypot(r[0], r[1], r[2])),
  };
}
