import assert from 'node:assert/strict';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Mat3, Vec3 } from '../../../src/core/model';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { main } from '../../../src/cli/main';
import type { CliIO } from '../../../src/cli/io';
import { writeEigenval, writeLineModeKpoints, writePoscar } from '../../support/writers/vasp';
import { fccPrimitive } from './crystals';
import { capture } from '../../support/unitCliCapture';

// fcc special points in the primitive reciprocal basis (Setyawan & Curtarolo, Comput. Mater. Sci. 49, 299
// (2010), FCC table); the path is theirs, cut after L.
const P: Record<string, Vec3> = { Γ: [0, 0, 0], X: [0.5, 0, 0.5], W: [0.5, 0.25, 0.75], K: [0.375, 0.375, 0.75], L: [0.5, 0.5, 0.5] };
const SEGMENTS: [string, string][] = [
  ['Γ', 'X'],
  ['X', 'W'],
  ['W', 'K'],
  ['K', 'Γ'],
  ['Γ', 'L'],
];
const N = 6;
const A = 5.431;

/** A run folder with EIGENVAL (a toy two-band insulator), POSCAR and, optionally, KPOINTS. */
function runFolder(opts: { kpoints: boolean; lattice?: Mat3 }): string {
  const dir = mkdtempSync(join(tmpdir(), 'vs-labels-'));
  const lattice = opts.lattice ?? fccPrimitive(A);
  const k: number[] = [];
  for (const [a, b] of SEGMENTS)
    for (let i = 0; i < N; i++) for (let c = 0; c < 3; c++) k.push(P[a]![c]! + ((P[b]![c]! - P[a]![c]!) * i) / (N - 1));
  const nk = k.length / 3;
  // Invented toy energies: valence band highest at Γ, conduction band lowest at X (k index 5).
  const e = new Float64Array(nk * 2);
  for (let i = 0; i < nk; i++) {
    const kk = [k[3 * i]!, k[3 * i + 1]!, k[3 * i + 2]!];
    e[2 * i] = -(kk[0]! ** 2 + kk[1]! ** 2 + kk[2]! ** 2);
    e[2 * i + 1] = 1 + (kk[0]! - 0.5) ** 2 + kk[1]! ** 2 + (kk[2]! - 0.5) ** 2;
  }
  writeFileSync(
    join(dir, 'EIGENVAL'),
    writeEigenval({ system: 'toy', nIons: 2, electrons: 2, nBands: 2, kpoints: Float64Array.from(k), energies: [e], lattice }),
  );
  writeFileSync(
    join(dir, 'POSCAR'),
    writePoscar({
      comment: 'Si',
      lattice,
      species: ['Si'],
      counts: [2],
      positions: [
        [0, 0, 0],
        [0.25, 0.25, 0.25],
      ],
    }),
  );
  if (opts.kpoints) {
    writeFileSync(
      join(dir, 'KPOINTS'),
      writeLineModeKpoints({
        comment: 'path',
        pointsPerSegment: N,
        segments: SEGMENTS.map(([a, b]) => [
          { k: P[a]!, label: a },
          { k: P[b]!, label: b },
        ]),
      }),
    );
  }
  return dir;
}

const EXPECTED = SEGMENTS.flatMap(([a, b], s) => [
  { index: s * N, label: a },
  { index: s * N + N - 1, label: b },
]);

describe('labels inferred when a run has no path file', () => {
  it('labels Γ, X, W, K, L from the structure and warns that they were inferred', async () => {
    const bs = await loadRun(nodeFileAccessor, runFolder({ kpoints: false }));
    assert.deepEqual(bs.labels, EXPECTED);
    const w = bs.warnings.find((x) => x.code === 'labels-inferred');
    assert.ok(w, JSON.stringify(bs.warnings));
    assert.match(w.message, /inferred/);
    assert.match(w.message, /Γ, X, W, K, L/);
  });

  it('keeps the labels of KPOINTS when it is there, and infers nothing', async () => {
    const bs = await loadRun(nodeFileAccessor, runFolder({ kpoints: true }));
    assert.deepEqual(bs.labels, EXPECTED);
    assert.equal(
      bs.warnings.some((x) => x.code === 'labels-inferred'),
      false,
    );
  });

  it('says so when the lattice is not one whose points are recognised', async () => {
    // Monoclinic cell (β ≠ 90°) holding the two atoms at 0 and (¼,¼,¼): the structure keeps only the inversion
    // through their midpoint, so the crystal is triclinic (aP): no labels; a warning, not an error.
    const bs = await loadRun(
      nodeFileAccessor,
      runFolder({
        kpoints: false,
        lattice: [
          [4, 0, 0],
          [0, 5, 0],
          [1.2, 0, 6],
        ],
      }),
    );
    assert.deepEqual(bs.labels, []);
    const w = bs.warnings.find((x) => x.code === 'labels-not-inferred');
    assert.ok(w);
    assert.match(w.message, /not for aP/);
  });

  it('reports the inferred labels at the band edges in the CLI JSON', async () => {
    const io = capture();
    const cli: CliIO = io;
    const code = await main(['analyze', runFolder({ kpoints: false }), '--json'], cli);
    assert.equal(code, 0, io.stderr);
    const j = JSON.parse(io.stdout);
    // Toy model above: VBM at Γ, CBM at X (by construction).
    assert.equal(j.gap.vbm.label, 'Γ');
    assert.equal(j.gap.cbm.label, 'X');
  });
});
