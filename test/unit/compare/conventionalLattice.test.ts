/**
 * Conventional cubic lattice constants from the lattice type and the volume per lattice point
 * (structureDescriptors.ts conventionalCubicA): primitive fcc and bcc cells, a conventional fcc cell, and
 * non-cubic cells (none).
 */
import assert from 'node:assert/strict';
import { conventionalCubicA, latticeParameters } from '../../../src/core/compare/structureDescriptors';
import type { Mat3 } from '../../../src/core/model';

const a = 5.431; // Si lattice constant at room temperature, Å (handbook value, memory); any a would do here

describe('conventional cubic lattice constant', () => {
  it('fcc primitive vectors (0, a/2, a/2)…: a = √2 × the primitive-vector length', () => {
    const fcc: Mat3 = [
      [0, a / 2, a / 2],
      [a / 2, 0, a / 2],
      [a / 2, a / 2, 0],
    ];
    const p = latticeParameters(fcc);
    const conv = conventionalCubicA('cF', p.volume, 1)!;
    assert.ok(Math.abs(conv - a) < 1e-12); // the fcc primitive cell holds a³/4 (common practice)
    assert.ok(Math.abs(conv - Math.SQRT2 * p.a) < 1e-12); // |a₁| = a/√2 (geometry of the vectors above)
  });

  it('bcc primitive vectors (−a/2, a/2, a/2)…: a = 2/√3 × the primitive-vector length', () => {
    const bcc: Mat3 = [
      [-a / 2, a / 2, a / 2],
      [a / 2, -a / 2, a / 2],
      [a / 2, a / 2, -a / 2],
    ];
    const p = latticeParameters(bcc);
    const conv = conventionalCubicA('cI', p.volume, 1)!;
    assert.ok(Math.abs(conv - a) < 1e-12); // the bcc primitive cell holds a³/2 (common practice)
    assert.ok(Math.abs(conv - (2 / Math.sqrt(3)) * p.a) < 1e-12);
  });

  it('a conventional fcc cell given as is (4 lattice points in it) gives its own edge', () => {
    const cube: Mat3 = [
      [a, 0, 0],
      [0, a, 0],
      [0, 0, a],
    ];
    assert.ok(Math.abs(conventionalCubicA('cF', latticeParameters(cube).volume, 4)! - a) < 1e-12);
    // Control: the same cell read as primitive would be wrong by 4^(1/3).
    assert.ok(Math.abs(conventionalCubicA('cF', latticeParameters(cube).volume, 1)! - a * Math.cbrt(4)) < 1e-12);
  });

  it('non-cubic lattices (a strained film: tI; hexagonal) have no conventional cubic a', () => {
    assert.equal(conventionalCubicA('tI', 40, 1), null);
    assert.equal(conventionalCubicA('hP', 40, 1), null);
    assert.equal(conventionalCubicA(null, 40, 1), null);
  });
});
