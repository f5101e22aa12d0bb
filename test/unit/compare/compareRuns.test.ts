import assert from 'node:assert/strict';
import { compareRuns, type RunInput } from '../../../src/core/compare/compareRuns';
import { formatComparison } from '../../../src/core/compare/formatComparison';
import { structureDescriptors } from '../../../src/core/compare/structureDescriptors';
import type { ExtremumReport, Mat3, Report, Vec3 } from '../../../src/core/model';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { fccLattice } from '../../support/bandStructure';
import { compareTwo, handExtremum, handReport, type HandMass } from '../../support/unitHandReports';

// Hand-made reports of a silicon-like crystal (numbers invented for the test, not physical claims).
function ext(
  kind: ExtremumReport['kind'],
  band: number,
  k: Vec3,
  eV: number,
  offset: number,
  label: string | null,
  masses: HandMass[],
  nv: number | null = null,
): ExtremumReport {
  return handExtremum({ kind, band, k, eV, label, masses, offset_eV: offset, valleyDegeneracy: nv });
}

/** An indirect-gap report; the direct gap (3 eV at Γ) is not what these tests look at. */
const report = (extrema: ExtremumReport[]): Report => handReport(extrema, 3);

const G: Vec3 = [0, 0, 0];
const D: Vec3 = [0.425, 0, 0.425]; // 0.85 of Γ–X in the fcc primitive basis
const L: Vec3 = [0.5, 0.5, 0.5];
const a = 5.43;

describe('comparing runs', () => {
  it('gives differences against the reference on a hand-made pair', () => {
    const A = report([
      ext('vbm', 4, G, 0, 0, 'Γ', [['X', -0.5]]),
      ext('cbm', 5, D, 1.0, 0, null, [
        ['Γ', 0.9],
        ['X', 0.92],
      ]),
    ]);
    const B = report([
      ext('vbm', 4, G, 0.1, 0, 'Γ', [['X', -0.55]]),
      ext('cbm', 5, D, 1.3, 0, null, [
        ['Γ', 0.99],
        ['X', 0.92],
      ]),
    ]);
    const c = compareTwo(A, B);
    const b = c.runs[1]!;
    // Hand arithmetic: gap 1.0 → 1.2 eV; Γ-ward mass 0.9 → 0.99 is +10 %.
    assert.ok(Math.abs(b.deltaGap_eV! - 0.2) < 1e-12);
    const cbmCol = c.columns.find((x) => x.side === 'conduction')!;
    const m = b.valleys[cbmCol.id]!.masses.find((x) => x.towards === 'Γ')!;
    assert.ok(Math.abs(m.relativeChange! - 0.1) < 1e-12);
    assert.equal(c.events.length, 0);
  });

  it('a spin-orbit run whose edge is a Kramers pair (2 bands, one branch) pairs its masses with the run without spin-orbit coupling', () => {
    const plain = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, D, 1, 0, null, [['X', 0.9]])]);
    const pair = ext('cbm', 9, D, 0.98, 0, null, [['X', 0.9]]);
    pair.degenerateBands = 2; // a Kramers pair: the masses of one branch (kramersPairs.ts)
    const spinors = report([ext('vbm', 8, G, 0, 0, 'Γ', []), pair]);
    const c = compareTwo(plain, spinors);
    const col = c.columns.find((x) => x.side === 'conduction')!;
    const v = c.runs[1]!.valleys[col.id]!;
    assert.equal(v.degeneracyChanged, false);
    assert.equal(v.masses[0]!.status, 'compared');
    assert.ok(Math.abs(v.masses[0]!.relativeChange!) < 1e-12);
    // Branches that differ in number still refuse to pair (three bands without spin-orbit, two pairs with).
    const three = ext('vbm', 4, G, 0, 0, 'Γ', [
      ['X', -0.5, 1],
      ['X', -0.5, 2],
      ['X', -0.2, 3],
    ]);
    const two = ext('vbm', 8, G, 0, 0, 'Γ', [
      ['X', -0.5, 1],
      ['X', -0.2, 2],
    ]);
    const d = compareTwo(report([three, ext('cbm', 5, D, 1, 0, null, [])]), report([two, ext('cbm', 9, D, 1, 0, null, [])]));
    const vcol = d.columns.find((x) => x.side === 'valence')!;
    assert.equal(d.runs[1]!.valleys[vcol.id]!.degeneracyChanged, true);
  });

  it('matches extrema whose band indices moved (more semicore bands in one run)', () => {
    const A = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, D, 1, 0, null, [['X', 0.9]])]);
    const B = report([ext('vbm', 9, G, 0, 0, 'Γ', []), ext('cbm', 10, D, 1, 0, null, [['X', 0.91]])]);
    const c = compareTwo(A, B);
    assert.equal(c.columns.length, 2);
    assert.equal(c.runs[1]!.cbmValley, c.runs[0]!.cbmValley);
  });

  it('matches symmetry-equivalent valleys (a Δ valley written along another cube axis)', async () => {
    await ensureSymmetryReady();
    const lattice = fccLattice(a);
    const rotations = crystalSymmetry({
      lattice,
      species: ['Si', 'Si'],
      positions: Float64Array.from([0, 0, 0, 0.25, 0.25, 0.25]),
    }).rotations;
    // (0.425,0.425,0) is 0.85 of Γ→X along another cube axis: equivalent under O_h (Setyawan & Curtarolo fcc points).
    const A = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, D, 1, 0, null, [])]);
    const B = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, [0.425, 0.425, 0], 1, 0, null, [])]);
    const c = compareRuns([
      { name: 'a', report: A, lattice, rotations },
      { name: 'b', report: B, lattice, rotations },
    ]);
    assert.equal(c.columns.length, 2);
    assert.equal(c.events.filter((e) => e.kind === 'edge-moved').length, 0);
  });

  it('reports a valley-ordering flip as the edge moving, not as a huge mass change', () => {
    // Reference: CBM at Δ, L valley 150 meV higher. Strained: L drops below Δ.
    const A = report([
      ext('vbm', 4, G, 0, 0, 'Γ', []),
      ext('cbm', 5, D, 1.0, 0, null, [['X', 0.92]]),
      ext('valley', 5, L, 1.15, 0.15, 'L', [['Γ', 1.6]]),
    ]);
    const B = report([
      ext('vbm', 4, G, 0, 0, 'Γ', []),
      ext('valley', 5, D, 0.95, 0.05, null, [['X', 0.93]]),
      ext('cbm', 5, L, 0.9, 0, 'L', [['Γ', 1.58]]),
    ]);
    const c = compareRuns([
      { name: 'relaxed', report: A, lattice: null },
      { name: 'strained', report: B, lattice: null },
    ]);
    const moved = c.events.find((e) => e.kind === 'edge-moved');
    assert.ok(moved, 'an edge-moved event');
    assert.match(moved.message, /conduction band minimum moved from valley c1 .* to valley c2 \(L\)/);
    const s = c.runs[1]!;
    for (const v of Object.values(s.valleys))
      for (const m of v.masses) if (m.relativeChange !== null) assert.ok(Math.abs(m.relativeChange) < 0.05);
    const md = formatComparison(c, 'md');
    assert.match(md, /\| run \| gap \(eV\)/);
    assert.match(md, /What changed/);
    const csv = formatComparison(c, 'csv').split('\n');
    assert.equal(csv[0], 'run,extremum,kind,quantity,direction,branch,value,unit,reference_value,difference,relative_difference');
    // Long form: one mass row per run × valley × direction (this pair has one direction per valley).
    assert.equal(csv.filter((l) => l.includes(',abs_mass,')).length, 4);
  });

  it('describes strain relative to the reference lattice', () => {
    const ref: Mat3 = fccLattice(a);
    const strained: Mat3 = fccLattice(a * 1.01);
    const d = structureDescriptors(strained, ref);
    // Hydrostatic 1 %: V/V0 − 1 = 1.01³ − 1; Green–Lagrange ε = (1.01² − 1)/2 on the diagonal (analytic).
    assert.ok(Math.abs(d.volumeStrain! - (1.01 ** 3 - 1)) < 1e-12);
    assert.ok(Math.abs(d.strain![0][0] - (1.01 ** 2 - 1) / 2) < 1e-12);
    assert.ok(Math.abs(d.strain![0][1]) < 1e-12);
    // fcc primitive: |a_i| = a/√2 and 60° between vectors (analytic).
    assert.ok(Math.abs(d.a - (a * 1.01) / Math.SQRT2) < 1e-12);
    assert.ok(Math.abs(d.gamma - 60) < 1e-9);
  });

  it('uses the named reference run', () => {
    const A = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, D, 1, 0, null, [])]);
    const B = report([ext('vbm', 4, G, 0, 0, 'Γ', []), ext('cbm', 5, D, 1.5, 0, null, [])]);
    const runs: RunInput[] = [
      { name: 'a', report: A, lattice: null },
      { name: 'b', report: B, lattice: null },
    ];
    const c = compareRuns(runs, 'b');
    assert.equal(c.reference, 'b');
    assert.ok(Math.abs(c.runs[0]!.deltaGap_eV! + 0.5) < 1e-12);
  });
});

describe('comparing degenerate edges', () => {
  it('pairs masses branch with branch, not the first mass of a direction', () => {
    // Heavy (branch 1) and light (branch 2) holes towards X: a 5 % change in each, hand-made numbers.
    const withBranches = (heavy: number, light: number): ExtremumReport => {
      const e = ext('vbm', 4, G, 0, 0, 'Γ', [
        ['X', heavy],
        ['X', light],
      ]);
      e.masses[0]!.branch = 1;
      e.masses[1]!.branch = 2;
      return e;
    };
    const A = report([withBranches(-0.5, -0.2), ext('cbm', 5, D, 1, 0, null, [])]);
    const B = report([withBranches(-0.525, -0.21), ext('cbm', 5, D, 1, 0, null, [])]);
    const c = compareTwo(A, B);
    const v = c.columns.find((x) => x.side === 'valence')!;
    const changes = c.runs[1]!.valleys[v.id]!.masses.map((m) => m.relativeChange!);
    // Hand arithmetic: |−0.525| vs |−0.5| and |−0.21| vs |−0.2| are both +5 %: the holes got heavier.
    for (const x of changes) assert.ok(Math.abs(x - 0.05) < 1e-12, `${x}`);
  });
});
