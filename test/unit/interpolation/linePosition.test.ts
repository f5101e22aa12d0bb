/**
 * "0.85 Γ→X": where a point lies on the line from Γ to an image of a labelled special point. The answer is
 * defined as the smallest t over every periodic image of k (the 27 cells around it) and every image of every
 * special point; the function skips cells that cannot hold such a point. Checked against that definition written
 * out plainly (below), on points placed on lines (with a periodic shift and noise within and beyond the
 * tolerance) and on random points, for the fcc, bcc and hexagonal lattices (special points and their images
 * from specialPointMap). Lattice parameters: Si a = 5.431 Å, Fe a = 2.87 Å, Mg a = 3.21 Å, c = 5.21 Å (handbook
 * values, memory; any values would do).
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import type { Mat3, Structure, Vec3 } from '../../../src/core/model';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { specialPointMap, type SpecialPointMap } from '../../../src/core/lattice/specialPoints';
import { mat3Inverse, mulMatVec } from '../../../src/core/lattice/linalg';
import { LINE_TOLERANCE, positionOnGammaLine } from '../../../src/core/interpolation/linePosition';
import { fccLattice } from '../../support/models';

/** The definition, every cell and every image tried. */
function byDefinition(map: SpecialPointMap, k: Vec3, tol = LINE_TOLERANCE): string | null {
  const invM = mat3Inverse(map.M);
  let best: { t: number; label: string } | null = null;
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        const ks = mulMatVec(invM, [k[0] + a, k[1] + b, k[2] + c]);
        for (const p of map.images) {
          if (p.label === 'Γ') continue;
          for (const q of p.k) {
            const qq = q[0] * q[0] + q[1] * q[1] + q[2] * q[2];
            if (qq === 0) continue;
            const t = (ks[0] * q[0] + ks[1] * q[1] + ks[2] * q[2]) / qq;
            if (t <= tol || t >= 1 - tol) continue;
            const off = Math.max(Math.abs(ks[0] - t * q[0]), Math.abs(ks[1] - t * q[1]), Math.abs(ks[2] - t * q[2]));
            if (off < tol && (!best || t < best.t)) best = { t, label: p.label };
          }
        }
      }
    }
  }
  return best ? `${best.t.toFixed(2)} Γ→${best.label}` : null;
}

/** A number in [min, max] spread evenly (fast-check's doubles lean towards the ends). */
const fraction = (min: number, max: number): fc.Arbitrary<number> =>
  fc.integer({ min: 0, max: 10_000 }).map((i) => min + ((max - min) * i) / 10_000);
const oneAtom = (lattice: Mat3, s: string): Structure => ({ lattice, species: [s], positions: new Float64Array([0, 0, 0]) });
const bcc = (a: number): Mat3 => [
  [-a / 2, a / 2, a / 2],
  [a / 2, -a / 2, a / 2],
  [a / 2, a / 2, -a / 2],
];
const hex = (a: number, c: number): Mat3 => [
  [a, 0, 0],
  [-a / 2, (a * Math.sqrt(3)) / 2, 0],
  [0, 0, c],
];

describe('positionOnGammaLine: the same answers as its definition', function () {
  this.timeout(60000);
  const maps: [string, SpecialPointMap][] = [];
  before(async () => {
    await ensureSymmetryReady();
    for (const [name, s] of [
      ['fcc', oneAtom(fccLattice(5.431), 'Si')],
      ['bcc', oneAtom(bcc(2.87), 'Fe')],
      ['hex', oneAtom(hex(3.21, 5.21), 'Mg')],
    ] as const) {
      const map = specialPointMap(s.lattice, s);
      assert.ok(map, name);
      maps.push([name, map]);
    }
  });

  it('points on lines Γ→(an image of a special point), shifted by a reciprocal lattice vector, with noise', () => {
    let onLine = 0;
    for (const [name, map] of maps) {
      const ends = map.images.filter((p) => p.label !== 'Γ').flatMap((p) => p.k);
      fc.assert(
        fc.property(
          fc.nat(ends.length - 1),
          fraction(0, 1),
          fc.tuple(fc.integer({ min: -1, max: 1 }), fc.integer({ min: -1, max: 1 }), fc.integer({ min: -1, max: 1 })),
          fc.tuple(fraction(-1, 1), fraction(-1, 1), fraction(-1, 1)),
          fc.constantFrom(0, 0.5 * LINE_TOLERANCE, 2 * LINE_TOLERANCE),
          (i, t, g, noise, size) => {
            const ks = ends[i]!.map((x, j) => t * x + size * noise[j]!) as Vec3;
            const k = mulMatVec(map.M, ks).map((x, j) => x + g[j]!) as Vec3;
            const got = positionOnGammaLine(map, k);
            assert.equal(got, byDefinition(map, k), `${name} k = ${k.join(', ')}`);
            if (got !== null) onLine++;
          },
        ),
        { numRuns: 300, seed: 20261203 },
      );
    }
    // More than half lie on a line: a third are off by twice the tolerance, and some end within it of Γ or the point.
    assert.ok(onLine > 300, `${onLine} of 900 points found on a line: the check is not empty`);
  });

  it('random points anywhere in a few zones', () => {
    for (const [name, map] of maps) {
      fc.assert(
        fc.property(
          fc.tuple(
            fc.double({ min: -1.5, max: 1.5, noNaN: true }),
            fc.double({ min: -1.5, max: 1.5, noNaN: true }),
            fc.double({ min: -1.5, max: 1.5, noNaN: true }),
          ),
          (k) => {
            assert.equal(positionOnGammaLine(map, k as Vec3), byDefinition(map, k as Vec3), `${name} k = ${k.join(', ')}`);
          },
        ),
        { numRuns: 300, seed: 20261204 },
      );
    }
  });

  it('silicon’s conduction valley at 0.85 of Γ–X, written in the user’s fcc basis', () => {
    // Common practice (physics.md): the Δ minimum of silicon lies about 0.85 of the way from Γ to X. X = (0, ½, ½)
    // in the fcc primitive reciprocal basis used here (fccLattice, common practice).
    const map = maps[0]![1];
    assert.equal(positionOnGammaLine(map, [0, 0.425, 0.425]), '0.85 Γ→X');
    assert.equal(positionOnGammaLine(map, [0, 0.5, 0.5]), null, 'X itself is the end of the line');
  });
});
