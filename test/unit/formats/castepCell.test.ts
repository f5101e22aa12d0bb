/**
 * CASTEP's .cell for the atoms of a .bands run (the .bands file gives the cell only). Layout as CASTEP documents
 * its free-format input (common practice): %BLOCK LATTICE_CART / LATTICE_ABC with an optional unit line,
 * %BLOCK POSITIONS_FRAC / POSITIONS_ABS, case-insensitive keywords, # ! ; comments, species labels after a colon.
 * Checks: silicon's diamond structure (a = 5.43 Å, from memory; the two atoms at 0 and ¼ of the fcc primitive
 * cell: common practice), the Bohr radius (CODATA 2018) for absolute positions in bohr, and what a run gains:
 * the structure, hence the crystal's symmetry.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Mat3 } from '../../../src/core/model';
import { readCastepCell } from '../../../src/core/formats/castepCell';
import { readStructureFile } from '../../../src/core/formats/structureFile';
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { ReaderError } from '../../../src/core/errors';
import { BOHR_ANGSTROM } from '../../../src/core/units';
import { writeCastepBands } from '../../support/writers/castep';
import { collinearModel } from '../../support/writers/roundTripModel';
import { cosineBand, cubicLattice, fccLattice, pointsModel, simpleCubicStructure } from '../../support/models';
import { irreducibleMesh } from '../../../src/core/interpolation/regularMesh';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';

const A = 5.43;
const enc = (t: string): { path: string; bytes: Uint8Array } => ({ path: 'si.cell', bytes: new TextEncoder().encode(t) });
const fcc = fccLattice(A);
const rows = (m: Mat3): string => m.map((r) => r.map((x) => x.toFixed(8)).join('  ')).join('\n');
const gram = (m: Mat3): number[] =>
  [0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => m[i]![0] * m[j]![0] + m[i]![1] * m[j]![1] + m[i]![2] * m[j]![2]));

const SI_CELL = `# silicon, diamond structure
%block lattice_cart
  ang    ! units
${rows(fcc)}
%endblock lattice_cart

%BLOCK POSITIONS_FRAC
Si:1  0.00 0.00 0.00
Si    0.25 0.25 0.25   ; second atom
%ENDBLOCK POSITIONS_FRAC
kpoint_mp_grid 8 8 8
`;

describe('CASTEP .cell', function () {
  this.timeout(30000);
  before(() => ensureSymmetryReady());

  it('LATTICE_CART and POSITIONS_FRAC (comments, lower case, a species label): silicon is Fd-3m', () => {
    const c = readCastepCell(enc(SI_CELL));
    assert.deepEqual(c.species, ['Si', 'Si']);
    assert.deepEqual(Array.from(c.positions), [0, 0, 0, 0.25, 0.25, 0.25]);
    c.lattice!.forEach((r, i) => r.forEach((x, j) => assert.ok(Math.abs(x - fcc[i]![j]!) < 1e-7)));
    // Diamond structure: space group 227, Fd-3m (common practice).
    assert.equal(crystalSymmetry({ lattice: c.lattice!, species: c.species, positions: c.positions }).spaceGroup, 227);
  });

  it('LATTICE_ABC (a = b = c = a₀/√2, 60° angles: the fcc primitive cell) has the fcc cell’s lengths and angles', () => {
    const l = A / Math.SQRT2;
    const c = readCastepCell(
      enc(
        `%BLOCK LATTICE_ABC\n${l} ${l} ${l}\n60 60 60\n%ENDBLOCK LATTICE_ABC\n%BLOCK POSITIONS_FRAC\nSi 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n`,
      ),
    );
    gram(c.lattice!).forEach((g, i) => assert.ok(Math.abs(g - gram(fcc)[i]!) < 1e-9, `${g} vs ${gram(fcc)[i]}`));
  });

  it('POSITIONS_ABS in bohr, the cell in Å: fractional positions through the Bohr radius (CODATA 2018)', () => {
    const x = (A / 4 / BOHR_ANGSTROM).toFixed(10);
    const c = readCastepCell(
      enc(
        `%BLOCK LATTICE_CART\n${rows(fcc)}\n%ENDBLOCK LATTICE_CART\n%BLOCK POSITIONS_ABS\nbohr\nSi 0 0 0\nSi ${x} ${x} ${x}\n%ENDBLOCK POSITIONS_ABS\n`,
      ),
    );
    // (a/4)(1,1,1) is ¼ of each primitive vector's sum a/2·(1,1,0)+... : fractional (¼, ¼, ¼).
    Array.from(c.positions.subarray(3)).forEach((v) => assert.ok(Math.abs(v - 0.25) < 1e-9, String(v)));
  });

  it('species given by atomic number are read as such', () => {
    const c = readCastepCell(enc('%BLOCK POSITIONS_FRAC\n14 0 0 0\n14 0.25 0.25 0.25\n%ENDBLOCK POSITIONS_FRAC\n'));
    assert.deepEqual(c.species, ['14', '14']);
  });

  it('hostile or incomplete files are refused with the line (no positions, unterminated, twice, bad numbers, no volume)', () => {
    const cases: [string, RegExp][] = [
      [`%BLOCK LATTICE_CART\n${rows(fcc)}\n%ENDBLOCK LATTICE_CART\n`, /no POSITIONS_FRAC or POSITIONS_ABS/],
      ['%BLOCK POSITIONS_FRAC\nSi 0 0 0\n', /has no %ENDBLOCK/],
      [
        '%BLOCK POSITIONS_FRAC\nSi 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n%BLOCK POSITIONS_FRAC\nSi 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n',
        /given twice/,
      ],
      ['%BLOCK POSITIONS_FRAC\nSi 0 zero 0\n%ENDBLOCK POSITIONS_FRAC\n', /a position should be 3 numbers/],
      ['%BLOCK POSITIONS_FRAC\n1.0 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n', /is not a species/],
      ['%BLOCK POSITIONS_FRAC\n0 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n', /is not a species/],
      [
        '%BLOCK LATTICE_CART\n1 0 0\n2 0 0\n0 0 1\n%ENDBLOCK LATTICE_CART\n%BLOCK POSITIONS_FRAC\nSi 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n',
        /no volume/,
      ],
      ['%BLOCK POSITIONS_ABS\nSi 0 0 0\n%ENDBLOCK POSITIONS_ABS\n', /POSITIONS_ABS needs the cell/],
    ];
    // The line named is the offending one (line 2: the position with a word for a number).
    assert.throws(
      () => readCastepCell(enc(cases[3]![0])),
      (e: unknown) => e instanceof ReaderError && e.line === 2,
    );
    for (const [text, why] of cases) {
      assert.throws(
        () => readCastepCell(enc(text)),
        (e: unknown) => e instanceof ReaderError && why.test(e.message),
        text,
      );
    }
  });

  it('beside a .bands run: <seed>-out.cell before <seed>.cell gives the atoms; a different cell is said so; --structure takes a .cell', async () => {
    const bs = collinearModel();
    bs.lattice = fcc;
    const dir = mkdtempSync(join(tmpdir(), 'vs-castep-cell-'));
    const run = join(dir, 'run');
    mkdirSync(run);
    writeFileSync(join(run, 'si.bands'), writeCastepBands(bs));
    writeFileSync(join(run, 'si.cell'), SI_CELL.replace(/Si {4}0\.25/, 'Si    0.30'));
    writeFileSync(join(run, 'si-out.cell'), SI_CELL);
    const read = await loadRun(nodeFileAccessor, run);
    assert.ok(read.structure, read.warnings.map((w) => w.message).join('\n'));
    assert.deepEqual(Array.from(read.structure.positions), [0, 0, 0, 0.25, 0.25, 0.25]);
    assert.ok(!read.warnings.some((w) => w.code === 'no-structure'));
    assert.ok(read.source.files.some((f) => f.role === 'structure' && /si-out\.cell$/.test(f.path)));
    // A .cell of another cell (before a geometry optimisation): used in the run's cell, and said so.
    const other = join(dir, 'other');
    mkdirSync(other);
    writeFileSync(join(other, 'si.bands'), writeCastepBands(bs));
    writeFileSync(
      join(other, 'si.cell'),
      SI_CELL.replace(
        /%block lattice_cart[\s\S]*%endblock lattice_cart/,
        `%block lattice_cart\n${rows(fccLattice(5.6))}\n%endblock lattice_cart`,
      ),
    );
    const r2 = await loadRun(nodeFileAccessor, other);
    assert.ok(r2.structure);
    assert.ok(
      r2.warnings.some((w) => w.code === 'structure-cell-differs'),
      r2.warnings.map((w) => w.message).join('\n'),
    );
    // --structure with a .cell (the same function serves analyze, annotate, check and compare).
    const st = readStructureFile(enc(SI_CELL));
    assert.equal(st.layout, 'castep-cell');
    assert.equal(st.structure.species.length, 2);
  });

  it('a CASTEP mesh run (.bands of irreducible points and weights) with its .cell is interpolated as a mesh run', async () => {
    // Simple cubic one-band tight-binding pair (published analytic model; invented numbers), Γ-centred 6×6×6 mesh.
    const a = 4;
    const sym = crystalSymmetry(simpleCubicStructure(a));
    const mesh = irreducibleMesh([6, 6, 6], [0, 0, 0], sym.reciprocalPointGroup);
    const kpoints = Array.from(
      { length: mesh.kpoints.length / 3 },
      (_, i) => [0, 1, 2].map((j) => mesh.kpoints[3 * i + j]!) as [number, number, number],
    );
    const bs = pointsModel({
      lattice: cubicLattice(a),
      bands: [cosineBand(-3, [-0.5, -0.5, -0.5]), cosineBand(1, [0.6, 0.6, 0.6])],
      electrons: 2,
      kpoints,
    });
    bs.weights = Float64Array.from(mesh.weights);
    const dir = mkdtempSync(join(tmpdir(), 'vs-castep-mesh-'));
    writeFileSync(join(dir, 'po.bands'), writeCastepBands(bs));
    writeFileSync(
      join(dir, 'po.cell'),
      `%BLOCK LATTICE_CART\n${rows(cubicLattice(a))}\n%ENDBLOCK LATTICE_CART\n%BLOCK POSITIONS_FRAC\nPo 0 0 0\n%ENDBLOCK POSITIONS_FRAC\n`,
    );
    const r = analyzeBandStructure(await loadRun(nodeFileAccessor, dir));
    assert.ok(r.interpolation, r.warnings.join('\n'));
    assert.deepEqual(r.interpolation.divisions, [6, 6, 6]);
    // Direct gap at Γ: E_c(Γ) − E_v(Γ) = 1 − (−3) = 4 eV (the model's own values).
    assert.ok(Math.abs(r.gap!.eV - 4) < 1e-3, String(r.gap!.eV));
  });
});
