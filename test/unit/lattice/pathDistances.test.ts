import assert from 'node:assert/strict';
import type { Mat3 } from '../../../src/core/model';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { mulMat, mulMatVec } from '../../../src/core/lattice/linalg';
import { makeBands } from '../../support/bandStructure';
import { fccPrimitive, rotationMatrix } from './crystals';
import { FCC_POINTS } from '../../../scripts/epm/kpath';

// Hand-computed fcc leg lengths for conventional constant a (2π/a units), from the cartesian points
// X (0,1,0), W (½,1,0), K (¾,¾,0), L (½,½,½), U (¼,1,¼) (common practice; points as in Setyawan &
// Curtarolo 2010, FCC), differences computed by hand: |ΓX| = 1; |XW| = |(½,0,0)| = ½; |WK| = |(¼,−¼,0)| = √2/4;
// |KΓ| = |(¾,¾,0)| = 3√2/4; |ΓL| = √3/2; |LU| = |(−¼,½,−¼)| = √6/4; |UW| = |(¼,0,−¼)| = √2/4; |WL| = |(0,−½,½)| = √2/2.
const LEGS: [string, string, number][] = [
  ['Γ', 'X', 1],
  ['X', 'W', 0.5],
  ['W', 'K', Math.SQRT2 / 4],
  ['K', 'Γ', (3 * Math.SQRT2) / 4],
  ['Γ', 'L', Math.sqrt(3) / 2],
  ['L', 'U', Math.sqrt(6) / 4],
  ['U', 'W', Math.SQRT2 / 4],
  ['W', 'L', Math.SQRT2 / 2],
];
// Fractional coordinates in the primitive reciprocal basis of a1=(0,a/2,a/2), a2=(a/2,0,a/2), a3=(a/2,a/2,0)
// (Setyawan & Curtarolo 2010, FCC table, as the fixtures transcribe it).
const F = FCC_POINTS;

function linePath(M: Mat3, n: number): number[][] {
  const out: number[][] = [];
  for (const [a, b] of LEGS) {
    const p = mulMatVec(M, F[a]!);
    const q = mulMatVec(M, F[b]!);
    for (let i = 0; i < n; i++) out.push(p.map((x, j) => x + ((q[j]! - x) * i) / (n - 1)));
  }
  return out;
}

describe('k-path distances on the fcc path (hand-computed), for any description of the cell', () => {
  const a = 5.658;
  const unit = (2 * Math.PI) / a;
  const cells: [string, Mat3, Mat3][] = [
    // [name, M (A' = M·A, so k' = M k), rotation]
    [
      'standard primitive',
      [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
      [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
    ],
    [
      'sheared, permuted and rotated primitive',
      [
        [0, 1, 0],
        [1, 1, 0],
        [0, -1, 1],
      ],
      rotationMatrix([1, 2, 3], 0.7),
    ],
    // Conventional cubic cell: (a,0,0) = −a1+a2+a3 etc., 4 primitive cells (common practice).
    [
      'conventional cubic',
      [
        [-1, 1, 1],
        [1, -1, 1],
        [1, 1, -1],
      ],
      [
        [1, 0, 0],
        [0, 1, 0],
        [0, 0, 1],
      ],
    ],
  ];
  for (const [name, M, Q] of cells) {
    it(`gives |ΓX| = 2π/a and the other legs in the ${name} cell`, () => {
      const lattice = mulMat(M, fccPrimitive(a)).map((r) => mulMatVec(Q, r)) as Mat3;
      const n = 7;
      const k = linePath(M, n);
      const g = pathGeometry(makeBands({ kpoints: k, energies: [k.map(() => [0])], lattice }));
      assert.equal(g.units, 'inverse-angstrom');
      let expected = 0;
      LEGS.forEach(([, , len], s) => {
        expected += len * unit;
        const end = s * n + n - 1;
        assert.ok(
          Math.abs(g.distance[end]! - expected) < 1e-9,
          `${name}: distance at the end of leg ${s}: ${g.distance[end]} vs ${expected}`,
        );
        // The repeated start of the next leg does not advance the distance.
        if (s + 1 < LEGS.length) assert.ok(Math.abs(g.distance[end + 1]! - expected) < 1e-12);
      });
      assert.equal(g.segments.length, LEGS.length);
    });
  }
});
