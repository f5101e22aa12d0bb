import assert from 'node:assert/strict';
import fc from 'fast-check';
import type { BandStructure, Mat3, Structure, Vec3 } from '../../../src/core/model';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { recogniseLabels, recogniseSpecialPoints, standardCell } from '../../../src/core/lattice/specialPoints';
import { relateCells } from '../../../src/core/lattice/cellRelation';
import { cartesianToFractional, fractionalToCartesian, reciprocalLattice } from '../../../src/core/lattice/reciprocal';
import { mulMatVec } from '../../../src/core/lattice/linalg';
import { makeBands } from '../../support/bandStructure';
// The fcc path of Setyawan & Curtarolo 2010, Γ–X–W–K–Γ–L–U–W–L–K|U–X, as the fixtures transcribe it.
import { FCC_STANDARD_PATH as FCC_PATH } from '../../../scripts/epm/kpath';
import { anyCellChange, diamondConventional, diamondLike, fccPrimitive, redescribe, rotationMatrix, wurtzite } from './crystals';

// Special points are given here in CARTESIAN coordinates from the geometry of each Brillouin zone (common
// practice; e.g. Ashcroft & Mermin ch. 8, Kittel ch. 2 (memory)), and named as in Setyawan & Curtarolo,
// Comput. Mater. Sci. 49, 299 (2010) (names and paths recalled: memory). Each test converts them into the
// fractional reciprocal basis of the cell under test, so the fractional tables inside the code are checked,
// not repeated.

type Leg = [string, Vec3];
/** The legs of a path written as in Setyawan & Curtarolo: 'Γ–X–W|U–X' is Γ→X, X→W, then a break, U→X. */
function pathOf(notation: string): [string, string][] {
  return notation.split('|').flatMap((run) => {
    const names = run.split('–');
    return names.slice(1).map((b, i): [string, string] => [names[i]!, b]);
  });
}

/** Line-mode path: each segment from p to q with n points, ends repeated (as VASP writes line mode). */
function linePath(legs: [Leg, Leg][], n: number): { kc: Vec3[]; ends: Map<number, string> } {
  const kc: Vec3[] = [];
  const ends = new Map<number, string>();
  for (const [[la, a], [lb, b]] of legs) {
    for (let i = 0; i < n; i++) {
      const t = i / (n - 1);
      if (i === 0) ends.set(kc.length, la);
      if (i === n - 1) ends.set(kc.length, lb);
      kc.push([a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t, a[2] + (b[2] - a[2]) * t]);
    }
  }
  return { kc, ends };
}

/** A band structure whose k-points are the cartesian path `kc` expressed in the cell `lattice`. */
function bandsOn(lattice: Mat3, kc: Vec3[], structure: Structure | null): BandStructure {
  const kf = kc.map((k) => cartesianToFractional(k, lattice));
  const bs = makeBands({ kpoints: kf, energies: [kf.map(() => [0])], lattice });
  return { ...bs, structure };
}

/** The labels in order of k index, so two label maps compare whatever order they were built in. */
const sorted = (m: Map<number, string>): [number, string][] => [...m].sort((x, y) => x[0] - y[0]);

function labelsOf(bs: BandStructure): Map<number, string> {
  return new Map(recogniseLabels(bs).map((l) => [l.index, l.label]));
}

const rot = (v: Vec3, q: Mat3): Vec3 => mulMatVec(q, v);

// --- fcc (2π/a units): X (0,1,0), L (½,½,½), W (½,1,0), K (¾,¾,0), U (¼,1,¼).
const A = 5.431;
const u = (2 * Math.PI) / A;
const fccPts: Record<string, Vec3> = {
  Γ: [0, 0, 0],
  X: [0, u, 0],
  L: [u / 2, u / 2, u / 2],
  W: [u / 2, u, 0],
  K: [(3 * u) / 4, (3 * u) / 4, 0],
  U: [u / 4, u, u / 4],
};
const legsOf = (path: [string, string][], pts: Record<string, Vec3>, q?: Mat3): [Leg, Leg][] =>
  path.map(([a, b]) => [
    [a, q ? rot(pts[a]!, q) : pts[a]!],
    [b, q ? rot(pts[b]!, q) : pts[b]!],
  ]);

describe('high-symmetry label recognition (Setyawan & Curtarolo 2010)', () => {
  before(async () => {
    await ensureSymmetryReady();
  });

  it('labels Γ, X, W, K, L, U on the fcc path of Si without a path file, and nothing in between', () => {
    const { kc, ends } = linePath(legsOf(FCC_PATH, fccPts), 9);
    for (const structure of [diamondLike(A, 'Si', 'Si'), null]) {
      const got = labelsOf(bandsOn(fccPrimitive(A), kc, structure));
      assert.deepEqual(sorted(got), sorted(ends), structure ? 'with structure' : 'lattice only');
    }
    const r = recogniseSpecialPoints(bandsOn(fccPrimitive(A), kc, null));
    assert.equal(r.kind, 'FCC');
    assert.equal(r.bravaisClass, 'cF');
  });

  it('labels points written in another zone (k + G) like the points themselves', () => {
    // k and k + G are the same state for any reciprocal lattice vector G (Bloch's theorem: common practice).
    const lattice = fccPrimitive(A);
    const [b1, b2, b3] = reciprocalLattice(lattice);
    const { kc, ends } = linePath(legsOf(FCC_PATH, fccPts), 9);
    for (const g of [
      [b1[0] - b2[0], b1[1] - b2[1], b1[2] - b2[2]],
      [2 * b3[0], 2 * b3[1], 2 * b3[2]],
    ] as Vec3[]) {
      const shifted = kc.map((k): Vec3 => [k[0] + g[0], k[1] + g[1], k[2] + g[2]]);
      // In fcc, U and K are one point of the zone (U = K + G, the path's "K|U" jump): either name is right.
      const kIsU = (m: Map<number, string>): [number, string][] => sorted(m).map(([i, l]) => [i, l === 'U' ? 'K' : l]);
      assert.deepEqual(kIsU(labelsOf(bandsOn(lattice, shifted, null))), kIsU(ends));
    }
  });

  it('labels a point within the tolerance of a special point in any zone, and not one beyond it', () => {
    const lattice = fccPrimitive(A);
    const names = ['Γ', 'X', 'L', 'W', 'K'];
    const kc: Vec3[] = [];
    const want = new Map<number, string>();
    // Fractional offsets: 3e-5 inside LABEL_TOLERANCE (1e-4), 4e-4 outside; G from −2 to 2 in each coordinate.
    for (let i = 0; i < 400; i++) {
      const name = names[i % names.length]!;
      const base = cartesianToFractional(fccPts[name]!, lattice);
      const inside = i % 2 === 0;
      const off = inside ? 3e-5 : 4e-4;
      const f: Vec3 = [
        base[0] + ((i * 7) % 5) - 2 + (i % 4 < 2 ? off : -off),
        base[1] + ((i * 3) % 5) - 2 - off,
        base[2] + ((i * 11) % 5) - 2,
      ];
      kc.push(fractionalToCartesian(f, reciprocalLattice(lattice)));
      if (inside) want.set(i, name);
    }
    const got = labelsOf(bandsOn(lattice, kc, null));
    const kIsU = (m: Map<number, string>): [number, string][] => sorted(m).map(([i, l]) => [i, l === 'U' ? 'K' : l]);
    assert.deepEqual(kIsU(got), kIsU(want));
  });

  it('gives the same labels for any primitive cell of the crystal, rotated (property)', () => {
    const si = diamondLike(A, 'Si', 'Si');
    fc.assert(
      fc.property(anyCellChange, fc.boolean(), ({ M, Q: q }: { M: Mat3; Q: Mat3 }, withStructure: boolean) => {
        const st = redescribe(si, M, q);
        // The cartesian path rotates with the crystal.
        const { kc, ends } = linePath(legsOf(FCC_PATH, fccPts, q), 5);
        const got = labelsOf(bandsOn(st.lattice, kc, withStructure ? st : null));
        assert.deepEqual(sorted(got), sorted(ends));
      }),
      { seed: 2010, numRuns: 20 },
    );
  });

  it('labels the fcc points in the conventional cubic cell when the structure shows the fcc lattice', () => {
    const { kc, ends } = linePath(legsOf(pathOf('Γ–X–W–L–Γ–K'), fccPts), 7);
    const conv = diamondConventional(A, 'Si');
    const got = labelsOf(bandsOn(conv.lattice, kc, conv));
    assert.deepEqual(sorted(got), sorted(ends));
  });

  it('labels Γ, M, K, A, L, H on the hexagonal path for 120° and 60° cells and for wurtzite', () => {
    const a = 3.25;
    const c = 5.21;
    // Hexagonal zone (common practice): |ΓM| = 2π/(√3 a) towards an edge, |ΓK| = 4π/(3a) towards a corner
    // (corners lie along the real-space a vectors), |ΓA| = π/c.
    const a1: Vec3 = [1, 0, 0];
    const m: Vec3 = [0, (2 * Math.PI) / (Math.sqrt(3) * a), 0];
    const k: Vec3 = [((4 * Math.PI) / (3 * a)) * a1[0], 0, 0];
    const az: Vec3 = [0, 0, Math.PI / c];
    const add = (p: Vec3, q: Vec3): Vec3 => [p[0] + q[0], p[1] + q[1], p[2] + q[2]];
    const pts: Record<string, Vec3> = { Γ: [0, 0, 0], M: m, K: k, A: az, L: add(m, az), H: add(k, az) };
    // Setyawan & Curtarolo's hexagonal path: Γ–M–K–Γ–A–L–H–A|L–M|K–H.
    const path = pathOf('Γ–M–K–Γ–A–L–H–A|L–M|K–H');
    const { kc, ends } = linePath(legsOf(path, pts), 6);
    const h = (Math.sqrt(3) / 2) * a;
    const cells: Mat3[] = [
      [
        [a, 0, 0],
        [-a / 2, h, 0],
        [0, 0, c],
      ], // 120°
      [
        [a, 0, 0],
        [a / 2, h, 0],
        [0, 0, c],
      ], // 60°
      [
        [0, 0, c],
        [a, 0, 0],
        [a / 2, h, 0],
      ], // c first
    ];
    for (const lat of cells) {
      const got = labelsOf(bandsOn(lat, kc, null));
      assert.deepEqual(sorted(got), sorted(ends), JSON.stringify(lat));
    }
    // Wurtzite in the Setyawan & Curtarolo orientation, then rotated 30° about c: the labels follow the crystal.
    const wz = wurtzite(a, c, 0.382, 'Zn', 'O');
    const q = rotationMatrix([0, 0, 1], Math.PI / 6);
    // In the S&C orientation (a1 = (a/2, −a√3/2, 0)) one corner K lies along a1.
    const sc: Vec3 = [0.5, -Math.sqrt(3) / 2, 0];
    const ang = Math.atan2(sc[1], sc[0]);
    const r0 = rotationMatrix([0, 0, 1], ang);
    const wzPts = Object.fromEntries(Object.entries(pts).map(([n, p]) => [n, rot(p, r0)])) as Record<string, Vec3>;
    for (const [st, qq] of [
      [wz, null],
      [
        redescribe(
          wz,
          [
            [1, 0, 0],
            [0, 1, 0],
            [0, 0, 1],
          ],
          q,
        ),
        q,
      ],
    ] as const) {
      const path2 = linePath(legsOf(path, wzPts, qq ?? undefined), 6);
      const got = labelsOf(bandsOn(st.lattice, path2.kc, st));
      assert.deepEqual(sorted(got), sorted(path2.ends));
    }
  });

  it('labels the simple cubic, bcc, simple tetragonal and simple orthorhombic points', () => {
    const pi = Math.PI;
    const cases: { name: string; lattice: Mat3; pts: Record<string, Vec3>; path: [string, string][]; kind: string }[] = [];
    /** An orthogonal cell with edges a, b, c along x, y, z, listed c first. */
    const cFirst = (a: number, b: number, c: number): Mat3 => [
      [0, 0, c],
      [a, 0, 0],
      [0, b, 0],
    ];
    {
      const a = 4.1;
      // Simple cubic (common practice): X (0,π/a,0), M (π/a,π/a,0), R (π/a,π/a,π/a); path Γ–X–M–Γ–R–X|M–R.
      cases.push({
        name: 'sc',
        kind: 'CUB',
        lattice: [
          [a, 0, 0],
          [0, a, 0],
          [0, 0, a],
        ],
        pts: { Γ: [0, 0, 0], X: [0, pi / a, 0], M: [pi / a, pi / a, 0], R: [pi / a, pi / a, pi / a] },
        path: pathOf('Γ–X–M–Γ–R–X|M–R'),
      });
    }
    {
      const a = 3.3;
      const v = (2 * pi) / a;
      // bcc (common practice): H (0,0,1)2π/a, N (½,½,0)2π/a, P (½,½,½)2π/a; path Γ–H–N–Γ–P–H|P–N.
      cases.push({
        name: 'bcc',
        kind: 'BCC',
        lattice: [
          [a / 2, a / 2, -a / 2],
          [-a / 2, a / 2, a / 2],
          [a / 2, -a / 2, a / 2],
        ],
        pts: { Γ: [0, 0, 0], H: [0, 0, v], N: [v / 2, v / 2, 0], P: [v / 2, v / 2, v / 2] },
        path: pathOf('Γ–H–N–Γ–P–H|P–N'),
      });
    }
    {
      const a = 3.9;
      const c = 5.1;
      // Simple tetragonal: X (0,π/a,0), M (π/a,π/a,0), Z (0,0,π/c), R (0,π/a,π/c), A (π/a,π/a,π/c);
      // path Γ–X–M–Γ–Z–R–A–Z|X–R|M–A. The cell is given with c first.
      cases.push({
        name: 'tet',
        kind: 'TET',
        lattice: cFirst(a, a, c),
        pts: {
          Γ: [0, 0, 0],
          X: [0, pi / a, 0],
          M: [pi / a, pi / a, 0],
          Z: [0, 0, pi / c],
          R: [0, pi / a, pi / c],
          A: [pi / a, pi / a, pi / c],
        },
        path: pathOf('Γ–X–M–Γ–Z–R–A–Z|X–R|M–A'),
      });
    }
    {
      const [a, b, c] = [3.1, 4.2, 5.7];
      // Simple orthorhombic with a < b < c: X = π/a along the shortest axis, Y = π/b, Z = π/c, S = X+Y,
      // T = Y+Z, U = X+Z, R = X+Y+Z; path Γ–X–S–Y–Γ–Z–U–R–T–Z|Y–T|U–X|S–R. The cell lists c, a, b.
      const X: Vec3 = [pi / a, 0, 0];
      const Y: Vec3 = [0, pi / b, 0];
      const Z: Vec3 = [0, 0, pi / c];
      const s = (...v: Vec3[]): Vec3 => v.reduce((p, q) => [p[0] + q[0], p[1] + q[1], p[2] + q[2]], [0, 0, 0] as Vec3);
      cases.push({
        name: 'orc',
        kind: 'ORC',
        lattice: cFirst(a, b, c),
        pts: { Γ: [0, 0, 0], X, Y, Z, S: s(X, Y), T: s(Y, Z), U: s(X, Z), R: s(X, Y, Z) },
        path: pathOf('Γ–X–S–Y–Γ–Z–U–R–T–Z|Y–T|U–X|S–R'),
      });
    }
    for (const cs of cases) {
      const { kc, ends } = linePath(legsOf(cs.path, cs.pts), 5);
      const bs = bandsOn(cs.lattice, kc, null);
      const r = recogniseSpecialPoints(bs);
      assert.equal(r.kind, cs.kind, cs.name);
      const got = new Map(r.labels.map((l) => [l.index, l.label]));
      assert.deepEqual(sorted(got), sorted(ends), cs.name);
    }
  });

  it('recognises a special point written outside the first zone (modulo a reciprocal lattice vector)', () => {
    // L + (b1 + b2) and X − b2 in the fcc primitive basis: the same points of the crystal.
    const bs = makeBands({
      kpoints: [
        [1.5, 1.5, 0.5],
        [0.5, -1, 0.5],
        [0.2, 0.1, 0],
      ],
      energies: [[[0], [0], [0]]],
      lattice: fccPrimitive(A),
    });
    assert.deepEqual(recogniseLabels(bs), [
      { index: 0, label: 'L' },
      { index: 1, label: 'X' },
    ]);
  });

  it('gives no labels, and says why, for lattices outside the covered set', () => {
    // Monoclinic (β ≠ 90°) and base-centred orthorhombic cells are not covered.
    const mono: Mat3 = [
      [4, 0, 0],
      [0, 5, 0],
      [1.2, 0, 6],
    ];
    const baseCentred: Mat3 = [
      [1.5, -2.5, 0],
      [1.5, 2.5, 0],
      [0, 0, 7],
    ];
    for (const [lat, cls] of [
      [mono, 'mP'],
      [baseCentred, 'oS'],
    ] as const) {
      const r = recogniseSpecialPoints(
        makeBands({
          kpoints: [
            [0, 0, 0],
            [0.5, 0, 0],
          ],
          energies: [[[0], [0]]],
          lattice: lat,
        }),
      );
      assert.deepEqual(r.labels, []);
      assert.equal(r.bravaisClass, cls);
      assert.match(r.reason ?? '', new RegExp(`not for ${cls}`));
    }
    const none = recogniseSpecialPoints(makeBands({ kpoints: [[0, 0, 0]], energies: [[[0]]] }));
    assert.deepEqual(none.labels, []);
    assert.equal(none.reason, 'no lattice is known');
  });

  it('relates a cell to the standard one by an integer matrix of the right determinant', () => {
    // The conventional cubic cell holds 4 fcc primitive cells (common practice): |det M| = 4.
    const M = relateCells(
      [
        [A, 0, 0],
        [0, A, 0],
        [0, 0, A],
      ],
      fccPrimitive(A),
    );
    assert.ok(M);
    const det =
      M[0][0] * (M[1][1] * M[2][2] - M[1][2] * M[2][1]) -
      M[0][1] * (M[1][0] * M[2][2] - M[1][2] * M[2][0]) +
      M[0][2] * (M[1][0] * M[2][1] - M[1][1] * M[2][0]);
    assert.equal(Math.abs(det), 4);
    assert.equal(
      relateCells(
        [
          [A, 0, 0],
          [0, A, 0],
          [0, 0, 1.1 * A],
        ],
        fccPrimitive(A),
      ),
      null,
    );
  });
  it('puts every special point of every covered lattice on the zone surface (Wigner–Seitz construction)', () => {
    // Wigner–Seitz construction (common practice): k lies on the first-zone surface when no reciprocal lattice
    // vector G is closer to it than Γ and at least one G ≠ 0 is as close. Setyawan & Curtarolo's points other
    // than Γ are all zone-surface points, so a wrong table entry (or BCT1/BCT2 mixed up) falls off the surface.
    const lattices: [string, [number, number, number]][] = [
      ['cP', [4, 4, 4]],
      ['cF', [5.4, 5.4, 5.4]],
      ['cI', [3.3, 3.3, 3.3]],
      ['hP', [3.2, 3.2, 5.2]],
      ['tP', [3.9, 3.9, 5.1]],
      ['tI', [4, 4, 3]],
      ['tI', [3, 3, 5]],
      ['oP', [3.1, 4.2, 5.7]],
    ];
    for (const [cls, lengths] of lattices) {
      const std = standardCell({
        bravaisClass: cls,
        spaceGroup: 0,
        conventional: [
          [1, 0, 0],
          [0, 1, 0],
          [0, 0, 1],
        ],
        lengths,
        fromStructure: false,
      });
      assert.ok(std, cls);
      const B = reciprocalLattice(std.primitive);
      for (const p of std.points) {
        const k = fractionalToCartesian(p.k, B);
        const k2 = k[0] ** 2 + k[1] ** 2 + k[2] ** 2;
        let closest = Infinity;
        for (let x = -3; x <= 3; x++)
          for (let y = -3; y <= 3; y++)
            for (let z = -3; z <= 3; z++) {
              if (x === 0 && y === 0 && z === 0) continue;
              const g = fractionalToCartesian([x, y, z], B);
              closest = Math.min(closest, (k[0] - g[0]) ** 2 + (k[1] - g[1]) ** 2 + (k[2] - g[2]) ** 2);
            }
        if (p.label === 'Γ') assert.ok(closest > k2 + 1e-6, cls);
        else
          assert.ok(
            Math.abs(closest - k2) < 1e-9 * Math.max(1, k2),
            `${std.kind} ${p.label}: not on the zone surface (${closest} vs ${k2})`,
          );
      }
    }
  });

  it('names the points of body-centred tetragonal zones by their geometry (BCT1 c < a, BCT2 c > a)', () => {
    const pi = Math.PI;
    // BCT1, a = 4, c = 3 (c < a). Zone geometry (derived by hand from the Bragg planes, common practice):
    // X = π/a (1,1,0) (half of G = 2π/a (1,1,0)); M = 2π/a (1,0,0); N = π (1/a, 0, 1/c); P = π (1/a, 1/a, 1/c)/…
    // Z: the zone's apex on the c axis, equidistant from Γ and G = 2π (0, 1/a, 1/c): z = π (1/c + c/a²).
    // BCT2, a = 3, c = 5 (c > a): Z = 2π/c (0,0,1) (half of G = (0,0,4π/c)); Σ: the zone's vertex on the a
    // axis, equidistant from Γ and G = 2π (1/a, 0, 1/c): x = π (1/a + a/c²).
    const zones: { kind: string; a: number; c: number; path: string; pts: (a: number, c: number) => Record<string, Vec3> }[] = [
      {
        kind: 'BCT1',
        a: 4,
        c: 3,
        path: 'Γ–X–M–Γ–Z–N',
        pts: (a, c) => ({
          Γ: [0, 0, 0],
          X: [pi / a, pi / a, 0],
          M: [(2 * pi) / a, 0, 0],
          N: [pi / a, 0, pi / c],
          Z: [0, 0, pi * (1 / c + c / (a * a))],
        }),
      },
      {
        kind: 'BCT2',
        a: 3,
        c: 5,
        path: 'Γ–X–Γ–Z–Γ–Σ',
        pts: (a, c) => ({ Γ: [0, 0, 0], X: [pi / a, pi / a, 0], Z: [0, 0, (2 * pi) / c], Σ: [pi * (1 / a + a / (c * c)), 0, 0] }),
      },
    ];
    for (const { kind, a, c, path, pts } of zones) {
      const lat: Mat3 = [
        [-a / 2, a / 2, c / 2],
        [a / 2, -a / 2, c / 2],
        [a / 2, a / 2, -c / 2],
      ];
      const { kc, ends } = linePath(legsOf(pathOf(path), pts(a, c)), 5);
      const r = recogniseSpecialPoints(bandsOn(lat, kc, null));
      assert.equal(r.kind, kind);
      assert.deepEqual(new Map(r.labels.map((l) => [l.index, l.label])), ends);
    }
  });

  it('labels silicon under (001) biaxial strain: in-plane X stays X, the strain-axis X becomes Z, L becomes N', () => {
    // −1 % in plane, +0.77 % along [001] (the demo's strain series; ε⊥ = −2 C12/C11 ε∥, handbook elastic
    // constants (memory)). Under this strain the crystal is body-centred tetragonal with c/a = √2 (1+ε⊥)/(1+ε∥)
    // > 1 in its bct cell: BCT2. Cartesian fcc points with the strained edges a∥, a⊥ (common practice).
    const a0 = 5.431;
    const [ap, az] = [a0 * 0.99, a0 * 1.0077];
    const lattice: Mat3 = [
      [0, ap / 2, az / 2],
      [ap / 2, 0, az / 2],
      [ap / 2, ap / 2, 0],
    ];
    const si: Structure = { lattice, species: ['Si', 'Si'], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
    const pts: Record<string, Vec3> = {
      Γ: [0, 0, 0],
      X: [0, (2 * Math.PI) / ap, 0],
      Z: [0, 0, (2 * Math.PI) / az],
      N: [Math.PI / ap, Math.PI / ap, Math.PI / az],
    };
    const { kc, ends } = linePath(legsOf(pathOf('Z–Γ–X–Γ–N'), pts), 6);
    const r = recogniseSpecialPoints(bandsOn(lattice, kc, si));
    assert.equal(r.bravaisClass, 'tI');
    assert.equal(r.kind, 'BCT2');
    assert.deepEqual(new Map(r.labels.map((l) => [l.index, l.label])), ends);
  });
});
