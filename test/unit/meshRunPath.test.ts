import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../src/core/analysis/analyze';
import { interpolatedPathRun } from '../../src/core/analysis/meshRunPath';
import { pathGeometry } from '../../src/core/lattice/kpath';
import { meshRunForView } from '../../src/extension/meshRunView';
import type { BandStructure } from '../../src/core/model';
import { annotationsSaveRefusal } from '../../src/core/annotations/saveRefusal';
import {
  AXIS_VALLEY_BANDS,
  axisValleyBands,
  axisValleyMeshRun,
  axisValleyTruth,
  cubicOperations,
  type AxisValleyParameters,
} from '../../scripts/meshModel/axisValleyModel';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { writeEigenval } from '../support/writers/vasp';

// The band view's picture of a mesh run: the interpolated bands along the standard simple-cubic path
// Γ–X–M–Γ–R–X|M–R (Setyawan & Curtarolo, Comput. Mater. Sci. 49, 299 (2010), memory). The model
// (scripts/meshModel/axisValleyModel.ts) is a sum of the first star functions, so the interpolant must give its
// closed-form energies along the path (analytic model).
const MODEL: AxisValleyParameters = { L: 3.8, v0: -0.3, tv: 0.45, ec: 5.2, a: -1.6295, b: 0.25, B: 1.2 };

describe('a mesh run drawn along the standard path of its lattice', function () {
  this.timeout(120000);
  let dir = '';
  let mesh: BandStructure;
  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-meshpath-'));
    const run = axisValleyMeshRun(MODEL, 12, 'axis-valley path test');
    writeFileSync(join(dir, 'EIGENVAL'), run.eigenval);
    writeFileSync(join(dir, 'POSCAR'), run.poscar);
    mesh = await loadRun(nodeFileAccessor, dir);
  });
  after(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('gives a path run with the standard labels and the model energies along it', () => {
    const made = interpolatedPathRun(mesh);
    assert.ok(made.path, made.reason ?? '');
    const path = made.path;
    assert.equal(path.sampling, 'path');
    assert.equal(path.nBands, 4);
    const corners = path.labels.map((l) => l.label).filter((l, i, all) => i === 0 || l !== all[i - 1]);
    assert.deepEqual(corners, ['Γ', 'X', 'M', 'Γ', 'R', 'X', 'M', 'R']); // the cubic path, X|M a jump (Setyawan & Curtarolo 2010, memory)
    const geometry = pathGeometry(path);
    assert.equal(geometry.segments.filter((s) => s.afterJump).length, 1);
    const worst = [0, 0, 0, 0];
    const [lo, hi] = [
      [Infinity, Infinity, Infinity, Infinity],
      [-Infinity, -Infinity, -Infinity, -Infinity],
    ];
    for (let i = 0; i < path.nk; i++) {
      const exact = axisValleyBands(MODEL, [path.kpoints[3 * i]!, path.kpoints[3 * i + 1]!, path.kpoints[3 * i + 2]!]);
      for (let b = 0; b < 4; b++) {
        worst[b] = Math.max(worst[b]!, Math.abs(path.energies[0]![i * 4 + b]! - exact[b]!));
        lo[b] = Math.min(lo[b]!, exact[b]!);
        hi[b] = Math.max(hi[b]!, exact[b]!);
      }
    }
    // The interpolant of these few cosine sums follows the model to a small fraction of each band's width
    // (the written energies carry 6 decimals; the star fit is exact through them, smooth between).
    worst.forEach((w, b) => assert.ok(w < 2e-5 * (hi[b]! - lo[b]!), `band ${b + 1}: ${w} eV of a ${hi[b]! - lo[b]!} eV width`));
    assert.match(made.caution, /^Interpolated from a 12×12×12 mesh/);
  });

  it('is never saved as the run annotations (those are the mesh analysis that check recomputes); the mesh run itself may be', () => {
    const made = interpolatedPathRun(mesh);
    assert.ok(made.path, made.reason ?? '');
    assert.deepEqual(made.path.interpolatedFrom, { divisions: [12, 12, 12] });
    assert.match(annotationsSaveRefusal(made.path) ?? '', /^Not saved: these bands are interpolated from the 12×12×12 mesh/);
    assert.equal(annotationsSaveRefusal(mesh), null);
  });

  it('opens in the view like a path run: a path analysis with the interpolation caution and the mesh result', () => {
    const meshReport = analyzeBandStructure(mesh);
    const shown = meshRunForView({ bs: mesh, report: meshReport }, DEFAULT_SETTINGS);
    assert.equal(shown.bs.sampling, 'path');
    assert.match(shown.report.cautions[0]!, /^Interpolated from a 12×12×12 mesh/);
    assert.ok(shown.report.warnings.some((w) => /mesh itself/.test(w) && /CBM at 0\.78 Γ→X/.test(w)));
    // The conduction minimum of the model lies on Γ–X, so the path analysis finds the model's gap too
    // (closed form, axisValleyTruth), within the path's sampling.
    const truth = axisValleyTruth(MODEL);
    assert.ok(Math.abs(shown.report.gap!.eV - (truth.cbm_eV - truth.vbm_eV)) < 2e-3, String(shown.report.gap!.eV));
    // Path runs pass through unchanged.
    const other = { bs: { ...mesh, sampling: 'path' as const }, report: analyzeBandStructure({ ...mesh, sampling: 'path' }) };
    assert.equal(meshRunForView(other, DEFAULT_SETTINGS), other);
  });

  it('a metallic mesh run keeps its classification (no gap) and still opens as interpolated bands along the path', async () => {
    // The same model with 3 electrons: the valence band half filled, states below a Fermi level at the
    // band's centre occupied (a metal by construction).
    const { kpoints, weights } = irreducibleMesh([12, 12, 12], [0, 0, 0], cubicOperations());
    const nk = kpoints.length / 3;
    const energies = new Float64Array(nk * AXIS_VALLEY_BANDS);
    const occupations = new Float64Array(nk * AXIS_VALLEY_BANDS);
    for (let i = 0; i < nk; i++) {
      const e = axisValleyBands(MODEL, [kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!]);
      energies.set(e, i * AXIS_VALLEY_BANDS);
      occupations[i * AXIS_VALLEY_BANDS] = 1;
      occupations[i * AXIS_VALLEY_BANDS + 1] = e[1]! < MODEL.v0 ? 1 : 0;
    }
    const metalDir = mkdtempSync(join(tmpdir(), 'vs-meshmetal-'));
    try {
      writeFileSync(
        join(metalDir, 'EIGENVAL'),
        writeEigenval({
          system: 'axis-valley metal',
          nIons: 1,
          electrons: 3,
          nBands: AXIS_VALLEY_BANDS,
          kpoints,
          weights,
          energies: [energies],
          occupations: [occupations],
          lattice: mesh.lattice!,
        }),
      );
      writeFileSync(join(metalDir, 'POSCAR'), axisValleyMeshRun(MODEL, 2, 'metal').poscar);
      const bs = await loadRun(nodeFileAccessor, metalDir);
      const report = analyzeBandStructure(bs);
      assert.equal(report.metal, true);
      assert.equal(report.gap, null);
      assert.equal(report.interpolation, undefined);
      const shown = meshRunForView({ bs, report }, DEFAULT_SETTINGS);
      assert.equal(shown.bs.sampling, 'path');
      assert.equal(shown.report.metal, true);
      assert.match(shown.report.cautions[0]!, /^Interpolated from a 12×12×12 mesh/);
    } finally {
      rmSync(metalDir, { recursive: true, force: true });
    }
  });
});
