import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { invariantTensorBasis } from '../../../src/core/analysis/symmetryTensor';

// Tensors invariant under a point group (common practice; Nye, Physical Properties of Crystals, ch. 1 (memory)):
// a 4-fold axis along z with a mirror leaves 2 independent components (xx = yy, zz), a 2-fold axis along z 4
// (xx, yy, zz, xy), a cubic group 1. The operations are built here as cartesian rotations.

const rotZ = (quarterTurns: number): Mat3 => {
  const c = Math.round(Math.cos((quarterTurns * Math.PI) / 2));
  const s = Math.round(Math.sin((quarterTurns * Math.PI) / 2));
  return [
    [c, -s, 0],
    [s, c, 0],
    [0, 0, 1],
  ];
};
const mirrorX: Mat3 = [
  [-1, 0, 0],
  [0, 1, 0],
  [0, 0, 1],
];
const mul = (a: Mat3, b: Mat3): Mat3 =>
  a.map((r) => [0, 1, 2].map((j) => r[0]! * b[0]![j]! + r[1]! * b[1]![j]! + r[2]! * b[2]![j]!)) as Mat3;
const perm: Mat3 = [
  [0, 0, 1],
  [1, 0, 0],
  [0, 1, 0],
];

describe('invariant tensor basis', () => {
  it('counts the independent components of a tetragonal, a monoclinic-like and a cubic group', () => {
    const c4v = [0, 1, 2, 3].flatMap((q) => [rotZ(q), mul(rotZ(q), mirrorX)]);
    assert.equal(invariantTensorBasis(c4v).length, 2);
    assert.equal(invariantTensorBasis([rotZ(0), rotZ(2)]).length, 4);
    const cubic = [...c4v, ...c4v.map((r) => mul(perm, r)), ...c4v.map((r) => mul(perm, mul(perm, r)))];
    assert.equal(invariantTensorBasis(cubic).length, 1);
  });

  it('the same operation objects again: the same basis, and changing an answer does not change the next', () => {
    const ops = [0, 1, 2, 3].map((q) => rotZ(q));
    const a = invariantTensorBasis(ops);
    a[0]![0]![0] = 99;
    const b = invariantTensorBasis([...ops]);
    const fresh = invariantTensorBasis(ops.map((m) => m.map((r) => [...r]) as Mat3));
    assert.deepEqual(b, fresh);
    assert.notEqual(b[0]![0]![0], 99);
  });
});
