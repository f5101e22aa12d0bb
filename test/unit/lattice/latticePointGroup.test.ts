import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { crystalSymmetry, DEFAULT_SYMPREC, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { standardCell } from '../../../src/core/lattice/specialPoints';
import { latticeOnlyStructure, type BravaisLattice } from '../../../src/core/lattice/bravais';
import { latticeHolohedry } from '../../../src/core/lattice/latticePointGroup';

// The lattice point group found from the metric alone is checked against the crystal-symmetry library (moyo, a
// general-purpose reference library) on a one-atom cell of the same lattice: the same set of operations. Orders
// of the holohedries (m-3m 48, 6/mmm 24, 4/mmm 16, mmm 8): International Tables for Crystallography vol. A (memory).

const key = (m: Mat3): string => m.map((r) => r.join(',')).join(';');
const setOf = (ms: Mat3[]): string[] => ms.map(key).sort();

function bravais(bravaisClass: string, lengths: [number, number, number]): BravaisLattice {
  const conventional: Mat3 = [
    [lengths[0], 0, 0],
    [0, lengths[1], 0],
    [0, 0, lengths[2]],
  ];
  return { bravaisClass, spaceGroup: 1, conventional, lengths, fromStructure: false };
}

const ORDER: Record<string, number> = { cP: 48, cF: 48, cI: 48, hP: 24, tP: 16, tI: 16, oP: 8 };

describe('lattice point group from the metric', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  // Class and conventional lengths (Å); body-centred tetragonal with c < a and with c > a (its two kinds).
  const cases =
    'cP 4.1 4.1 4.1|cF 5.43 5.43 5.43|cI 3.3 3.3 3.3|hP 3.19 3.19 5.19|hP 2.46 2.46 1.5|tP 4.6 4.6 2.96|tP 3 3 7|tI 4 4 3|tI 3 3 9|oP 3 4 5|oP 2.5 6 9.5'
      .split('|')
      .map((c) => {
        const [cls, ...l] = c.split(' ');
        return [cls!, l.map(Number) as [number, number, number]] as const;
      });
  for (const [cls, lengths] of cases) {
    it(`${cls} ${lengths.join(' × ')} Å: the library's operations, ${ORDER[cls]} of them`, () => {
      const std = standardCell(bravais(cls, lengths));
      assert.ok(std);
      const ours = latticeHolohedry(std.primitive, DEFAULT_SYMPREC, ORDER[cls]!);
      assert.ok(ours, 'found from the metric');
      const lib = crystalSymmetry(latticeOnlyStructure(std.primitive), DEFAULT_SYMPREC).reciprocalPointGroup;
      assert.equal(ours.length, ORDER[cls]);
      assert.deepEqual(setOf(ours), setOf(lib));
    });
  }

  it('a lattice near a higher symmetry is left to the library (null), never given a smaller group', () => {
    // Tetragonal with c within the tolerance of a: the metric shows cubic operations too.
    const std = standardCell(bravais('tP', [4.0, 4.0, 4.0 + 1e-3]));
    assert.ok(std);
    assert.equal(latticeHolohedry(std.primitive, DEFAULT_SYMPREC, 16), null);
    // Orthorhombic with a ≈ b.
    const orc = standardCell(bravais('oP', [3.0, 3.0005, 5.0]));
    assert.ok(orc);
    assert.equal(latticeHolohedry(orc.primitive, DEFAULT_SYMPREC, 8), null);
  });

  it('a degenerate cell gives null', () => {
    const flat: Mat3 = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 0],
    ];
    assert.equal(latticeHolohedry(flat, DEFAULT_SYMPREC, 48), null);
  });
});
