/**
 * The mesh a run's input declares — VASP's KPOINTS automatic forms and vasprun.xml's <generation>, pw.x's
 * <monkhorst_pack> — read into one convention and checked against the mesh the k-points form.
 * Layouts and rules (common practice, from the codes' own documentation):
 * - VASP KPOINTS: line 2 is 0 for an automatic mesh; line 3 Gamma / Monkhorst-Pack / Auto; line 4 the
 *   divisions (Auto: a length R_k, n_i = max(1, ⌊R_k |b_i| + ½⌋), Γ-centred); line 5 an optional shift.
 *   A Monkhorst–Pack mesh of even n is offset by half a step from Γ, of odd n it goes through Γ.
 * - vasprun.xml repeats that header as <generation param="Gamma"> with <v name="divisions"> and
 *   <v name="usershift"> (the layout as VASP 5.4/6 writes it, from memory).
 * - pw.x: <monkhorst_pack nk1 nk2 nk3 k1 k2 k3>, a mesh through Γ offset by half a step along each axis whose
 *   k is 1 (pw.x's K_POINTS automatic).
 * The model data are a simple cubic one-band tight-binding pair of bands (E = E0 ∓ 2t Σ cos k_i a, a published
 * analytic model) on the irreducible points of a Γ-centred 6×6×6 mesh: invented numbers, the layouts are the codes'.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BandStructure, Mat3 } from '../../../src/core/model';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { declaredMeshMismatch, describeMesh, meshRunNotUsed } from '../../../src/core/analysis/declaredMesh';
import { insulatorOccupations, writeEigenval, writePoscar } from '../../support/writers/vasp';
import { writeVasprun } from '../../support/writers/vasprun';
import { writeQeXml } from '../../support/writers/qe';
import { collinearModel } from '../../support/writers/roundTripModel';
import { cubicLattice, simpleCubicStructure } from '../../support/models';

const A = 4; // Å
const root = mkdtempSync(join(tmpdir(), 'vs-declared-'));
let n = 0;

/** A mesh run folder: EIGENVAL (+ POSCAR) of the model on the Γ-centred m×m×m mesh, and the KPOINTS text given. */
function meshRun(m: number, kpoints: string | null, drop = 0): string {
  const dir = join(root, `run${n++}`);
  const structure = simpleCubicStructure(A);
  const sym = crystalSymmetry(structure);
  const full = irreducibleMesh([m, m, m], [0, 0, 0], sym.reciprocalPointGroup);
  // `drop`: the last points left out (a run whose file lacks part of its mesh).
  const nk = full.kpoints.length / 3 - drop;
  const k = full.kpoints.slice(0, 3 * nk);
  const weights = full.weights.slice(0, nk);
  const e = new Float64Array(nk * 2);
  for (let i = 0; i < nk; i++) {
    const s = [0, 1, 2].reduce((acc, j) => acc + Math.cos(2 * Math.PI * k[3 * i + j]!), 0);
    e[2 * i] = -0.5 * (3 + s); // valence: E = −t(3 + Σ cos), t = 0.5 eV, maximum 0 at R (½, ½, ½)
    e[2 * i + 1] = 1.5 + 0.6 * (3 - s); // conduction: minimum 1.5 eV at Γ
  }
  const lattice: Mat3 = cubicLattice(A);
  mkdirSync(dir);
  writeFileSync(
    join(dir, 'EIGENVAL'),
    writeEigenval({
      system: 'declared mesh model',
      nIons: 1,
      electrons: 2,
      nBands: 2,
      kpoints: k,
      weights,
      energies: [e],
      occupations: [insulatorOccupations(nk, 2, 1)],
      lattice,
    }),
  );
  writeFileSync(join(dir, 'POSCAR'), writePoscar({ comment: 'sc', lattice, species: ['Po'], counts: [1], positions: [[0, 0, 0]] }));
  if (kpoints !== null) writeFileSync(join(dir, 'KPOINTS'), kpoints);
  return dir;
}

const auto = (kind: string, line4: string, line5 = '0 0 0'): string => `Automatic mesh\n0\n${kind}\n ${line4}\n ${line5}\n`;

describe('declared k-point meshes', function () {
  this.timeout(60000);
  before(() => ensureSymmetryReady());

  it('KPOINTS Gamma, Monkhorst–Pack (even and odd) and fully automatic forms, as VASP documents them', async () => {
    const read = async (text: string): Promise<BandStructure> => loadRun(nodeFileAccessor, meshRun(4, text));
    const g = (await read(auto('Gamma', '6 6 6'))).declaredMesh!;
    assert.deepEqual(
      [g.divisions, g.shift],
      [
        [6, 6, 6],
        [0, 0, 0],
      ],
    );
    assert.match(g.source, /KPOINTS \(Γ-centred\)/);
    // Monkhorst–Pack, even n: offset by half a step; odd n: through Γ (VASP's KPOINTS documentation).
    assert.deepEqual((await read(auto('Monkhorst-Pack', '8 8 8'))).declaredMesh!.shift, [0.5, 0.5, 0.5]);
    assert.deepEqual((await read(auto('Monkhorst-Pack', '5 5 5'))).declaredMesh!.shift, [0, 0, 0]);
    // A user shift of ½ on a Γ-centred mesh.
    assert.deepEqual((await read(auto('Gamma', '4 4 4', '0.5 0 0'))).declaredMesh!.shift, [0.5, 0, 0]);
    // Fully automatic, R_k = 20 Å on a = 4 Å: |b_i| = 1/4 Å⁻¹, n = ⌊20/4 + ½⌋ = 5 (VASP's rule), Γ-centred.
    const a = (await read('Fully automatic\n0\nAuto\n 20\n')).declaredMesh!;
    assert.deepEqual(
      [a.divisions, a.shift],
      [
        [5, 5, 5],
        [0, 0, 0],
      ],
    );
  });

  it('hostile or non-mesh KPOINTS declare nothing (never allocated, only compared)', async () => {
    for (const text of [
      auto('Gamma', '100000 100000 100000'),
      auto('Gamma', '0 6 6'),
      auto('Gamma', '6 6 6.5'),
      auto('Gamma', 'NaN 6 6'),
      'list\n2\nReciprocal\n0 0 0 1\n0.5 0 0 1\n',
    ]) {
      const bs = await loadRun(nodeFileAccessor, meshRun(4, text));
      assert.equal(bs.declaredMesh, undefined, JSON.stringify(text));
    }
  });

  it('vasprun.xml <generation param="Gamma"> and "Monkhorst-Pack"; implausible divisions declare nothing', async () => {
    const bs = collinearModel();
    const read = async (gen: { param: string; divisions: string; usershift?: string }): Promise<BandStructure> => {
      const dir = join(root, `vr${n++}`);
      mkdirSync(dir);
      writeFileSync(join(dir, 'vasprun.xml'), writeVasprun(bs, { meshGeneration: gen }));
      return loadRun(nodeFileAccessor, dir);
    };
    const g = (await read({ param: 'Gamma', divisions: '      12      12      12' })).declaredMesh!;
    assert.deepEqual(
      [g.divisions, g.shift],
      [
        [12, 12, 12],
        [0, 0, 0],
      ],
    );
    assert.match(g.source, /vasprun\.xml <generation> \(Γ-centred\)/);
    const mp = (await read({ param: 'Monkhorst-Pack', divisions: '       4       4       3' })).declaredMesh!;
    assert.deepEqual(
      [mp.divisions, mp.shift],
      [
        [4, 4, 3],
        [0.5, 0.5, 0],
      ],
    );
    assert.equal((await read({ param: 'Gamma', divisions: '  1000000  12  12' })).declaredMesh, undefined);
  });

  it('pw.x <monkhorst_pack>: through Γ, or offset by half a step where k_i = 1; nk = 0 declares nothing', async () => {
    const bs = collinearModel();
    const read = async (mp: [number, number, number], off: [number, number, number]): Promise<BandStructure> => {
      const dir = join(root, `qe${n++}`);
      mkdirSync(dir);
      writeFileSync(join(dir, 'si.xml'), writeQeXml(bs, { monkhorstPack: mp, monkhorstOffset: off }));
      return loadRun(nodeFileAccessor, dir);
    };
    const q = (await read([4, 4, 4], [1, 1, 0])).declaredMesh!;
    assert.deepEqual(
      [q.divisions, q.shift],
      [
        [4, 4, 4],
        [0.5, 0.5, 0],
      ],
    );
    assert.equal((await read([0, 4, 4], [0, 0, 0])).declaredMesh, undefined);
  });

  it('analysis: the declared mesh named when it is the points’ own, a warning naming both when not', async () => {
    const same = analyzeBandStructure(await loadRun(nodeFileAccessor, meshRun(6, auto('Gamma', '6 6 6'))));
    assert.ok(same.interpolation, 'interpolated');
    assert.match(same.interpolation.declaredBy ?? '', /KPOINTS \(Γ-centred\)/);
    assert.ok(!same.warnings.some((w) => /declares the mesh/.test(w)), same.warnings.join('\n'));
    const other = analyzeBandStructure(await loadRun(nodeFileAccessor, meshRun(6, auto('Monkhorst-Pack', '8 8 8'))));
    assert.ok(other.interpolation, 'still interpolated from the points');
    assert.equal(other.interpolation.declaredBy, undefined);
    assert.deepEqual(other.interpolation.divisions, [6, 6, 6]);
    const w = other.warnings.find((x) => /declares the mesh/.test(x));
    assert.ok(w, other.warnings.join('\n'));
    assert.match(
      w,
      /8×8×8 \(offset by half a step along b1, b2, b3\), but the k-points of the eigenvalue file form the mesh 6×6×6 \(through Γ\)/,
    );
  });

  it('a declared mesh the points do not form (points missing): the run is analysed as points, and the report says why', async () => {
    const r = analyzeBandStructure(await loadRun(nodeFileAccessor, meshRun(6, auto('Gamma', '6 6 6'), 3)));
    assert.equal(r.interpolation, undefined);
    const w = r.warnings.find((x) => /declares the mesh 6×6×6 \(through Γ\), but the run was not interpolated: /.test(x));
    assert.ok(w, r.warnings.join('\n'));
  });

  it('a refusal is told apart by its kind, not by its words: only bands with less symmetry speak for an undeclared, equal-weight list', () => {
    const plain = { declaredMesh: undefined, weights: new Float64Array([1, 1, 1]) };
    const sentence = 'Some words that happen to say the bands have less symmetry than the crystal.';
    assert.equal(meshRunNotUsed(plain, { kind: 'not-a-mesh', reason: sentence }), null);
    assert.equal(
      meshRunNotUsed(plain, { kind: 'lower-symmetry', reason: 'Points 1 and 2 differ.' }),
      'The k-points were not interpolated as a mesh run: Points 1 and 2 differ. They are analysed as they are.',
    );
    const reduced = { declaredMesh: undefined, weights: new Float64Array([1, 6, 8]) };
    assert.match(
      meshRunNotUsed(reduced, { kind: 'weights', reason: 'The weights differ.' }) ?? '',
      /not interpolated as a mesh run: The weights differ\. /,
    );
  });

  it('describeMesh and the comparison on their own (a shift of 1 is a shift of 0: the same mesh)', () => {
    assert.equal(describeMesh({ divisions: [3, 3, 2], shift: [0, 0, 0.5] }), '3×3×2 (offset by half a step along b3)');
    assert.equal(
      declaredMeshMismatch({ divisions: [4, 4, 4], shift: [0, 0, 0], source: 's' }, { divisions: [4, 4, 4], shift: [0, 0, 1] }),
      null,
    );
    assert.match(
      declaredMeshMismatch({ divisions: [4, 4, 4], shift: [0, 0, 0], source: 's' }, { divisions: [4, 4, 5], shift: [0, 0, 0] }) ?? '',
      /^S declares/,
    );
    assert.equal(declaredMeshMismatch(undefined, { divisions: [4, 4, 4], shift: [0, 0, 0] }), null);
  });
});
