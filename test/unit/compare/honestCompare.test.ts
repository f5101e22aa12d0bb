/**
 * Honest comparisons: mass differences on magnitudes, labelled by direction and branch; branches paired only
 * between edges of equal degeneracy; valleys of different crystals paired only at shared high-symmetry points;
 * the long-form CSV and the 120-column table.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { join } from 'node:path';
import { compareRuns, type Comparison, type RunInput, type Side } from '../../../src/core/compare/compareRuns';
import { formatComparison, TABLE_WIDTH } from '../../../src/core/compare/formatComparison';
import { CSV_COLUMNS } from '../../../src/core/compare/comparisonCsv';
import { compositionOf, structureDescriptors } from '../../../src/core/compare/structureDescriptors';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { loadRun } from '../../../src/core/load';
import { crystalSymmetry, ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { labelledLines } from '../../../src/core/lattice/pathPosition';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import type { ExtremumReport, Mat3, Report, Vec3 } from '../../../src/core/model';
import { compareTwo, handExtremum, handReport, type HandMass } from '../../support/unitHandReports';

// Hand-made reports (numbers chosen for the arithmetic, not physical claims): valence band 4, conduction band 5.
function ext(kind: ExtremumReport['kind'], k: Vec3, eV: number, label: string | null, masses: HandMass[], degenerate = 1): ExtremumReport {
  const band = kind === 'vbm' || kind === 'peak' ? 4 : 5;
  return handExtremum({ kind, band, k, eV, label, masses, degenerateBands: degenerate, valleyDegeneracy: 1 });
}

const G: Vec3 = [0, 0, 0];

/** A run with VBM (0 eV) and CBM (`cbm_eV`) both at Γ; `vbBands` bands meet at the VBM. */
function atGamma(vb: HandMass[], cb: HandMass[] = [], vbBands = 1, cbm_eV = 1): Report {
  return handReport([ext('vbm', G, 0, 'Γ', vb, vbBands), ext('cbm', G, cbm_eV, 'Γ', cb)]);
}

/** The valley entry of run 'b' on the given side. */
function valleyOfB(c: Comparison, side: Side) {
  return c.runs[1]!.valleys[c.columns.find((x) => x.side === side)!.id]!;
}

describe('honest comparison of masses', () => {
  it('gives the relative difference the sign of |new| − |reference|, for electron and hole masses', () => {
    const mass = fc.double({ min: 0.01, max: 10, noNaN: true });
    fc.assert(
      fc.property(mass, mass, mass, mass, (h0, h1, e0, e1) => {
        // Holes carry negative curvature masses at the VBM, electrons positive ones at the CBM (design: signed masses).
        const A = atGamma([['X', -h0]], [['X', e0]]);
        const B = atGamma([['X', -h1]], [['X', e1]]);
        const c = compareTwo(A, B);
        const b = c.runs[1]!;
        for (const [side, m0, m1] of [
          ['valence', h0, h1],
          ['conduction', e0, e1],
        ] as const) {
          const col = c.columns.find((x) => x.side === side)!;
          const m = b.valleys[col.id]!.masses[0]!;
          // (|m1| − |m0|)/|m0|, the definition (the example: a hole 59 % heavier is +59 %, not −59 %).
          assert.equal(Math.sign(m.relativeChange!), Math.sign(m1 - m0));
          assert.ok(Math.abs(m.relativeChange! - (m1 - m0) / m0) < 1e-12);
          assert.equal(m.direction, 'X');
        }
      }),
      { seed: 15, numRuns: 200 },
    );
  });

  it('labels every difference with its direction and branch', () => {
    // Each row: direction, branch, hole mass in run a, in run b (two bands meet at the VBM).
    const rows = [
      ['X', 1, -0.5, -0.6],
      ['X', 2, -0.2, -0.2],
      ['L', 1, -0.7, -0.7],
      ['L', 2, -0.1, -0.15],
    ] as const;
    const A = atGamma(
      rows.map(([d, branch, ma]) => [d, ma, branch]),
      [],
      2,
    );
    const B = atGamma(
      rows.map(([d, branch, , mb]) => [d, mb, branch]),
      [],
      2,
    );
    const c = compareTwo(A, B);
    const v = valleyOfB(c, 'valence');
    // Hand arithmetic: X branch 1: 0.6/0.5 − 1 = +20 %; X branch 2: 0; L branch 1: 0; L branch 2: 0.15/0.1 − 1 = +50 %.
    const got = v.masses.map((m) => [m.direction, m.branch, Math.round(m.relativeChange! * 1000) / 10]);
    assert.deepEqual(got, [
      ['X', 1, 20],
      ['X', 2, 0],
      ['L', 1, 0],
      ['L', 2, 50],
    ]);
    const table = formatComparison(c, 'table');
    assert.match(table, /v1 Γ\s+X\s+1\s+b\s+-0\.600\s+\+20\.0 %/);
    assert.match(table, /v1 Γ\s+L\s+2\s+b\s+-0\.150\s+\+50\.0 %/);
  });

  it('reports a change of degeneracy instead of pairing branches across it', () => {
    // Reference: three bands meet at Γ (heavy, heavy, light); the other run: two (a lowered symmetry).
    const cbMasses: HandMass[] = [['X', 0.1]];
    // prettier-ignore
    const A = atGamma([['X', -0.29, 1], ['X', -0.29, 2], ['X', -0.16, 3]], cbMasses, 3);
    // prettier-ignore
    const B = atGamma([['X', -0.29, 1], ['X', -0.17, 2]], cbMasses, 2);
    const c = compareTwo(A, B);
    const v = valleyOfB(c, 'valence');
    assert.ok(v.degeneracyChanged);
    for (const m of v.masses) {
      assert.equal(m.status, 'degeneracy changed');
      assert.equal(m.relativeChange, null);
    }
    const ev = c.events.filter((e) => e.kind === 'degeneracy-changed');
    assert.equal(ev.length, 1);
    assert.match(ev[0]!.message, /degeneracy changed: .* 2 degenerate bands, the reference 3/);
    assert.match(formatComparison(c, 'table'), /degeneracy changed/);
    // The conduction band, not degenerate in either run, is still compared.
    const cb = valleyOfB(c, 'conduction');
    assert.equal(cb.masses[0]!.status, 'compared');
  });
});

describe('matching valleys between different crystals', () => {
  const runs: RunInput[] = [];
  before(async function () {
    this.timeout(60000);
    await ensureSymmetryReady();
    for (const name of ['si', 'gaas']) {
      const bs = await loadRun(nodeFileAccessor, join('fixtures', 'epm', name));
      const sym = crystalSymmetry(bs.structure!);
      runs.push({
        name,
        report: analyzeBandStructure(bs),
        lattice: bs.lattice,
        rotations: sym.rotations,
        latticeType: sym.bravaisClass,
        composition: compositionOf(bs.structure!.species),
        pathLines: labelledLines(bs),
      });
    }
  });

  it('pairs Si and GaAs only at shared high-symmetry points, never a point on Γ–X with X or with Si’s Δ minimum', () => {
    const c = compareRuns(runs);
    const [si, gaas] = c.runs;
    let paired = 0;
    for (const col of c.columns) {
      const a = si!.valleys[col.id];
      const b = gaas!.valleys[col.id];
      if (!a || !b) continue;
      paired++;
      // Both ends of a pair are labelled high-symmetry points (Γ, X, L, …: the fixtures' KPOINTS labels).
      assert.ok(
        a.extremum.label && b.extremum.label,
        `${col.id}: ${a.extremum.label ?? a.extremum.k} with ${b.extremum.label ?? b.extremum.k}`,
      );
    }
    assert.ok(paired >= 1, 'the VBM at Γ is shared');
    // Si's conduction minimum lies on Γ–X (about 0.85 of the way, the model's README) and is not at a labelled
    // point: its column holds no GaAs extremum, and GaAs's extremum on Γ–X has its own column.
    const siCbm = c.columns.find((x) => x.id === si!.cbmValley)!;
    assert.equal(gaas!.valleys[siCbm.id], undefined);
    for (const col of c.columns) {
      const b = gaas!.valleys[col.id];
      if (b && !b.extremum.label) assert.equal(si!.valleys[col.id], undefined, `GaAs ${col.where} paired with Si`);
    }
    // Different crystals: no strain of one relative to the other.
    assert.equal(gaas!.descriptors!.volumeStrain, null);
    assert.equal(gaas!.relativeTo, null);
  });
});

describe('comparison outputs', () => {
  it('writes CSV in long form with exactly the agreed columns', () => {
    // prettier-ignore
    const A = atGamma([['X', -0.5]], [['X', 0.2], ['L', 0.3]], 1, 1);
    // prettier-ignore
    const B = atGamma([['X', -0.75]], [['X', 0.1], ['L', 0.3]], 1, 1.2);
    const c = compareTwo(A, B);
    const lines = formatComparison(c, 'csv').split('\n');
    assert.equal(lines[0], CSV_COLUMNS.join(','));
    assert.equal(
      CSV_COLUMNS.join(','),
      'run,extremum,kind,quantity,direction,branch,value,unit,reference_value,difference,relative_difference',
    );
    for (const l of lines) assert.equal(l.split(',').length, CSV_COLUMNS.length, l);
    // Hand arithmetic: hole |m| 0.5 → 0.75: difference +0.25, relative +0.5; electron X 0.2 → 0.1: −0.1, −0.5.
    assert.ok(lines.includes('b,v1 Γ,vbm,abs_mass,X,,0.75,m_e,0.5,0.25,0.5'), lines.join('\n'));
    assert.ok(lines.includes('b,c1 Γ,cbm,abs_mass,X,,0.1,m_e,0.2,-0.1,-0.5'), lines.join('\n'));
    assert.ok(lines.includes('b,gap,direct,gap,,,1.2,eV,1,0.2,0.2'), lines.join('\n'));
  });

  it('gives in-plane strain for a biaxial series, relative to the reference, in per cent in every format', () => {
    const a = 5.43;
    const cubic: Mat3 = [
      [a, 0, 0],
      [0, a, 0],
      [0, 0, a],
    ];
    // (001) biaxial: in-plane stretch 1.01, out-of-plane 0.992 (analytic: engineering strain = stretch − 1).
    const film: Mat3 = [
      [a * 1.01, 0, 0],
      [0, a * 1.01, 0],
      [0, 0, a * 0.992],
    ];
    const d = structureDescriptors(film, cubic);
    assert.ok(Math.abs(d.inPlaneStrain! - 0.01) < 1e-12);
    assert.ok(Math.abs(d.outOfPlaneStrain! + 0.008) < 1e-12);
    // Hydrostatic strain is not biaxial.
    assert.equal(structureDescriptors(cubic.map((r) => r.map((x) => x * 1.01)) as Mat3, cubic).inPlaneStrain, null);
    const A = atGamma([]);
    const c = compareRuns([
      { name: 'bulk', report: A, lattice: cubic },
      { name: 'film', report: A, lattice: film },
    ]);
    const table = formatComparison(c, 'table');
    assert.match(table, /in-plane \(%\)\*/);
    assert.match(table, /Strain relative to bulk \(the reference run\)/);
    const csv = formatComparison(c, 'csv');
    assert.match(csv, /^film,cell,structure,in_plane_strain,,,1,% relative to bulk,,,$/m);
    assert.match(csv, /^film,cell,structure,volume_strain,,,[0-9.]+,% relative to bulk,,,$/m);
  });

  it('keeps the text table within 120 columns however long the run names', () => {
    // prettier-ignore
    const vbm = ext('vbm', G, 0, 'Γ', [['X', -0.5, 1], ['X', -0.2, 2]], 2);
    // prettier-ignore
    const A = handReport([vbm, ext('cbm', [0.425, 0, 0.425], 1, null, [['Γ', 0.9], ['X', 0.92]])]);
    const names = [
      'runs/a-very-long-folder-name/of-a-cluster-project/bulk/EIGENVAL',
      'runs/a-very-long-folder-name/of-a-cluster-project/strained-by-one-per-cent/EIGENVAL',
    ];
    const c = compareRuns(names.map((name) => ({ name, report: A, lattice: null })));
    const text = formatComparison(c, 'table');
    for (const l of text.split('\n')) assert.ok([...l].length <= TABLE_WIDTH, `${[...l].length}: ${l}`);
    assert.match(text, /#2 {2}runs\/a-very-long/);
  });
});
