import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { fccLattice, line, makeBands } from '../../support/bandStructure';
import { labelsAt } from '../../support/unitLabels';

// fcc with conventional constant a: in fractional reciprocal coordinates of the primitive cell
// a1=(0,a/2,a/2), a2=(a/2,0,a/2), a3=(a/2,a/2,0): X = (0.5, 0, 0.5) = 2π/a (0,1,0),
// L = (0.5,0.5,0.5) = π/a (1,1,1), W = (0.5,0.25,0.75) = 2π/a (1/2,1,0), K = (0.375,0.375,0.75) =
// 2π/a (3/4,3/4,0), U = (0.625,0.25,0.625) = 2π/a (1/4,1,1/4) (Setyawan & Curtarolo 2010, Table for FCC).
const a = 5.43;
const G = [0, 0, 0];
const X = [0.5, 0, 0.5];
const W = [0.5, 0.25, 0.75];
const K = [0.375, 0.375, 0.75];
const U = [0.625, 0.25, 0.625];
const L = [0.5, 0.5, 0.5];

describe('k-path geometry', () => {
  it('gives hand-computed fcc distances and segments for a line-mode path with repeated ends and a jump', () => {
    const n = 11;
    const kpts = [...line(G, X, n), ...line(X, W, n), ...line(K, G, n), ...line(U, X, n), ...line(X, L, n)];
    const e = kpts.map(() => [0]);
    const labels = labelsAt([0, 10, 11, 21, 22, 32, 33, 43, 44, 54], ['Γ', 'X', 'X', 'W', 'K', 'Γ', 'U', 'X', 'X', 'L']);
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [e], lattice: fccLattice(a), labels }));
    const u = (2 * Math.PI) / a;
    // Hand-computed: |Γ−X| = 2π/a; |X−W| = π/a; |K−Γ| = 2π/a·(3√2/4); |U−X| = 2π/a·(√2/4); |X−L| = 2π/a·(√3/2).
    const legs = [u, u / 2, (u * 3 * Math.SQRT2) / 4, (u * Math.SQRT2) / 4, (u * Math.sqrt(3)) / 2];
    const expectEnd = (i: number, d: number): void =>
      assert.ok(Math.abs(g.distance[i]! - d) < 1e-9, `distance at ${i}: ${g.distance[i]} vs ${d}`);
    expectEnd(10, legs[0]!);
    expectEnd(11, legs[0]!); // repeated X: no advance
    expectEnd(21, legs[0]! + legs[1]!);
    expectEnd(22, legs[0]! + legs[1]!); // W → K jump: no advance
    expectEnd(32, legs[0]! + legs[1]! + legs[2]!);
    expectEnd(
      54,
      legs.reduce((s, x) => s + x, 0),
    );
    assert.equal(g.units, 'inverse-angstrom');
    assert.equal(g.segments.length, 5);
    assert.deepEqual(
      g.segments.map((s) => [s.start, s.end, s.afterJump]),
      [
        [0, 10, false],
        [11, 21, false],
        [22, 32, true],
        [33, 43, true],
        [44, 54, false],
      ],
    );
    assert.deepEqual(
      g.ticks.map((t) => t.label),
      ['Γ', 'X', 'W|K', 'Γ|U', 'X', 'L'],
    );
  });

  it('splits a path without repeated points where its direction turns', () => {
    const kpts = [...line(G, X, 6), ...line(X, W, 6).slice(1)];
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])], lattice: fccLattice(a) }));
    assert.deepEqual(
      g.segments.map((s) => [s.start, s.end]),
      [
        [0, 5],
        [5, 10],
      ],
    );
  });

  it('uses fractional distances without a lattice', () => {
    const kpts = line(G, X, 3);
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])] }));
    assert.equal(g.units, 'fractional');
    // |(0.5,0,0.5)| = √0.5 in fractional units (analytic).
    assert.ok(Math.abs(g.distance[2]! - Math.SQRT1_2) < 1e-12);
  });
});

describe('k-path geometry, corner cases', () => {
  it('a path written only at its corners advances on every leg, the last one included', () => {
    const kpts = [G, X, W, K, G, L];
    const labels = ['Γ', 'X', 'W', 'K', 'Γ', 'L'].map((label, index) => ({ index, label }));
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])], lattice: fccLattice(a), labels }));
    const u = (2 * Math.PI) / a;
    // Hand-computed legs (fcc, 2π/a units): Γ−X 1, X−W 1/2, W−K √2/4, K−Γ 3√2/4, Γ−L √3/2.
    const total = u * (1 + 0.5 + Math.SQRT2 / 4 + (3 * Math.SQRT2) / 4 + Math.sqrt(3) / 2);
    assert.ok(Math.abs(g.distance[5]! - total) < 1e-9, `${g.distance[5]} vs ${total}`);
  });

  it('legs of different point densities are not jumps', () => {
    // Tetragonal a = 3 Å, c = 40 Å: three short legs along c, then a long in-plane leg with as many points.
    const lat: Mat3 = [
      [3, 0, 0],
      [0, 3, 0],
      [0, 0, 40],
    ];
    const Z = [0, 0, 0.5];
    const kpts = [...line(G, Z, 6), ...line(Z, G, 6).slice(1), ...line(G, Z, 6).slice(1), ...line(Z, [0.5, 0, 0.5], 6).slice(1)];
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])], lattice: lat }));
    // Hand-computed: |Γ−Z| = π/c three times, then |Z−R| = π/a (analytic, simple tetragonal).
    const total = (3 * Math.PI) / 40 + Math.PI / 3;
    assert.ok(Math.abs(g.distance[kpts.length - 1]! - total) < 1e-9, `${g.distance[kpts.length - 1]} vs ${total}`);
    assert.ok(g.segments.every((s) => !s.afterJump));
  });

  it('computes a geometry once per band structure, and again for one whose labels or lattice are new', () => {
    const n = 11;
    const kpts = [...line(G, X, n), ...line(X, W, n)];
    const bs = makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])], lattice: fccLattice(a), labels: labelsAt([0, 10], ['Γ', 'X']) });
    const g = pathGeometry(bs);
    assert.equal(pathGeometry(bs), g, 'the same band structure: the geometry already computed');
    // New labels on the same object (a run given its path file later): ticks at Γ, X and W.
    bs.labels = labelsAt([0, 10, 21], ['Γ', 'X', 'W']);
    assert.deepEqual(
      pathGeometry(bs).ticks.map((t) => t.label),
      ['Γ', 'X', 'W'],
    );
    assert.deepEqual(
      g.ticks.map((t) => t.label),
      ['Γ', 'X'],
    );
    // A lattice twice as large: every reciprocal distance halves (reciprocal vectors scale as 1/a).
    const doubled = fccLattice(2 * a);
    bs.lattice = doubled;
    const g2 = pathGeometry(bs);
    assert.ok(Math.abs(g2.distance[10]! - g.distance[10]! / 2) < 1e-12, `${g2.distance[10]} vs ${g.distance[10]! / 2}`);
  });

  it('segment labels: the last label given for an index, labels outside the path ignored', () => {
    // Γ→X, then a labelled jump to W and on towards X (segments found from the labels, as in the first test).
    const kpts = [...line(G, X, 6), ...line(W, X, 6)];
    const labels = [...labelsAt([0, 5, 6, 11, 40], ['Γ', 'X', 'W', 'X', 'Z']), { index: 0, label: 'G' }];
    const g = pathGeometry(makeBands({ kpoints: kpts, energies: [kpts.map(() => [0])], lattice: fccLattice(a), labels }));
    assert.deepEqual(
      g.segments.map((s) => [s.start, s.end, s.startLabel, s.endLabel, s.afterJump]),
      [
        [0, 5, 'G', 'X', false],
        [6, 11, 'W', 'X', true],
      ],
    );
  });
});
