/**
 * The band view's mesh-point modules without a browser: the check of MeshPointsData against the band data,
 * the nearest mesh point for the read-out, and the exported figure's markers. Fed by the demo's mesh run
 * (fixtures/demo/tessellite-mesh: the simple-cubic model of scripts/meshModel, Γ-centred 12×12×12 mesh).
 */
import assert from 'node:assert/strict';
import { decodeMeshPoints, meshPointNear, meshPointsSentence } from '../../webview/bandView/meshPoints';
import { buildExportSvg } from '../../webview/bandView/exportPlot';
import { chooseReference } from '../../webview/bandView/energyReference';
import { buildViewModel } from '../../webview/bandView/viewModel';
import { loadMeshRunForView, type LoadedRun } from './support/coreBandData';
import { encodeArrayBase64, decodeArray, type BandData } from '../../src/protocol';

describe('band view: mesh points (pure modules)', function () {
  this.timeout(60_000);
  let run: LoadedRun;
  before(async () => {
    run = await loadMeshRunForView('fixtures/demo/tessellite-mesh', 'tessellite mesh');
  });

  it('decodes the mesh points and names them: 38 points of the 12×12×12 mesh on the simple-cubic path', () => {
    const vm = buildViewModel(run.data);
    const m = vm.meshPoints!;
    // Six segments of six mesh steps each; five connected segments share four corners, the sixth follows a
    // break (31 + 7 points; mesh geometry, as in test/unit/interpolation/meshPointsOnPath.test.ts).
    assert.equal(m.count, 38);
    assert.equal(
      meshPointsSentence(m),
      '38 points of the 12×12×12 mesh lie on this path: markers, mesh point (data); the lines are interpolated.',
    );
    const plain: BandData = { ...run.data };
    delete plain.meshPoints;
    assert.equal(buildViewModel(plain).meshPoints, undefined);
  });

  it('refuses mesh points that do not fit the band data', () => {
    const m = run.data.meshPoints!;
    const bad =
      (patch: Partial<NonNullable<BandData['meshPoints']>>): (() => void) =>
      () =>
        decodeMeshPoints({ ...run.data, meshPoints: { ...m, ...patch } }, decodeArray(run.data.distance) as Float64Array);
    assert.throws(bad({ count: m.count - 1 }), /distances for/);
    assert.throws(bad({ nBands: run.data.nBands + 1 }), /bands for a view of/);
    assert.throws(bad({ fileKpoint: m.fileKpoint.map(() => 0) }), /k-point numbers/);
    assert.throws(bad({ energies: [] }), /spin channels/);
    assert.throws(bad({ divisions: [12, 12, 0] }), /divisions/);
    const far = Float64Array.from(decodeArray(m.distance), (d, i) => (i === 0 ? d + 100 : d));
    assert.throws(bad({ distance: encodeArrayBase64(far) }), /off the path/);
  });

  it('finds the mesh point within reach of a path distance, none beyond', () => {
    const m = buildViewModel(run.data).meshPoints!;
    const d = m.distance[5]!;
    assert.equal(meshPointNear(m, d + 1e-4, 1e-3), 5);
    assert.equal(meshPointNear(m, d + 2e-3, 1e-3), -1);
  });

  it('the exported figure carries the mesh points in view as diamonds: all 38 on the valence band between −3.2 and 0.3 eV', () => {
    const vm = buildViewModel(run.data);
    const svg = buildExportSvg({
      vm,
      spins: [0],
      reference: chooseReference('vbm', { vbm_eV: run.data.vbm_eV, fermiEnergy: null }),
      xDomain: [vm.distance[0]!, vm.distance[vm.nk - 1]!],
      yDomain: [-3.2, 0.3],
      marks: [],
      curves: [],
    }).svg;
    const path = /<path class="mesh-points" d="([^"]+)"/.exec(svg);
    assert.ok(path, 'mesh points in the export');
    // The model's valence band spans −2.7…0 eV about the VBM (E = v0 + t_v Σ cos 2πk_i, t_v = 0.45: a width of
    // 6 t_v = 2.7 eV, analytic model); the other bands lie outside the window, so one diamond per mesh point.
    assert.equal(path[1]!.match(/M/g)!.length, 38);
    assert.match(svg, /<title>mesh point \(data\): the run's energies at the mesh points on the path; the lines are interpolated<\/title>/);
  });
});
