/**
 * The band view's picture of a mesh run (interpolated bands along the path, the mesh points on it) is made on
 * the analysis worker: as part of the analysis job (`forView`) or as a job of its own for a run analysed on the
 * host (`meshView`). Both give what the in-process call gives. The run is the demo's mesh run
 * (fixtures/demo/tessellite-mesh: the simple-cubic tight-binding model of scripts/meshModel, 12×12×12 mesh).
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { runAnalysisJob, runMeshViewJob, type AnalysisJob, type MeshViewJob } from '../../../src/extension/analysisJob';
import type { WorkerReply, WorkerRequest } from '../../../src/extension/workerMessages';
import { isMeshRun, MAX_PATH_VIEW_POINTS, MAX_WORKER_VIEW_POINTS, meshRunForView } from '../../../src/extension/meshRunView';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { reportToJson } from '../../../src/core/report/reportJson';
import { axisValleyBands } from '../../../scripts/meshModel/axisValleyModel';
import { TESSELLITE } from '../../../scripts/meshModel/demoMeshRun';
import { analysisWorkerThread, folderJob, loadSi } from './demoRun';

const MESH_DIR = join(__dirname, '../../../fixtures/demo/tessellite-mesh');

function meshJob(forView: boolean): AnalysisJob {
  return folderJob(MESH_DIR, 'EIGENVAL', ['POSCAR', 'KPOINTS'], forView);
}

function inWorker(request: WorkerRequest): Promise<WorkerReply> {
  const worker = analysisWorkerThread();
  return new Promise<WorkerReply>((resolve, reject) => {
    worker.on('message', (m: WorkerReply) => {
      if (m.type !== 'progress') resolve(m);
    });
    worker.on('error', reject);
    worker.postMessage(request);
  }).finally(() => void worker.terminate());
}

describe('extension: a mesh run made into the band view on the analysis worker', function () {
  this.timeout(120000);
  before(() => ensureSymmetryReady());

  it('an analysis job with forView gives the interpolated path and the mesh points on it, with the model energies', async () => {
    const out = await runAnalysisJob(meshJob(true));
    assert.equal(out.bs.sampling, 'path');
    assert.ok(out.bs.interpolatedFrom);
    assert.match(out.report.cautions[0]!, /^Interpolated from a 12×12×12 mesh.*markers are the run's own energies at the \d+ mesh points/);
    const m = out.meshPoints!;
    assert.ok(m && m.irreducible.length > 0);
    // The markers carry the data: the model's energies at their k (closed-form model, written with 6 decimals).
    for (let i = 0; i < m.irreducible.length; i++) {
      const exact = axisValleyBands(TESSELLITE, [m.kpoints[3 * i]!, m.kpoints[3 * i + 1]!, m.kpoints[3 * i + 2]!]);
      for (let b = 0; b < m.nBands; b++) assert.ok(Math.abs(m.energies[0]![i * m.nBands + b]! - exact[b]!) < 2e-6);
    }
    // Without forView the job gives the run as read (its own points), as the host's small-run path expects.
    const plain = await runAnalysisJob(meshJob(false));
    assert.notEqual(plain.bs.sampling, 'path');
    assert.equal(plain.meshPoints, undefined);
  });

  it('on a worker thread: the analysis job with forView, and a meshView job for a run read elsewhere, agree with in-process', async () => {
    const local = await runAnalysisJob(meshJob(true));
    const fromJob = await inWorker(meshJob(true));
    assert.equal(fromJob.type, 'done');
    const plain = await runAnalysisJob(meshJob(false));
    // As the host sends a small mesh run it has read: the worker analyses it and makes the picture.
    const view: MeshViewJob = { kind: 'meshView', run: { bs: plain.bs }, settings: DEFAULT_SETTINGS };
    const fromView = await inWorker(view);
    assert.equal(fromView.type, 'done');
    for (const reply of [fromJob, fromView]) {
      if (reply.type !== 'done') continue;
      assert.equal(reply.bs.sampling, 'path');
      assert.ok(reply.bs.energies[0] instanceof Float64Array);
      assert.deepEqual(Array.from(reply.bs.energies[0]), Array.from(local.bs.energies[0]!));
      assert.deepEqual(reportToJson(reply.report), reportToJson(local.report));
      assert.ok(reply.meshPoints?.distance instanceof Float64Array);
      assert.deepEqual(Array.from(reply.meshPoints.irreducible), Array.from(local.meshPoints!.irreducible));
      assert.deepEqual(Array.from(reply.meshPoints.distance), Array.from(local.meshPoints!.distance));
    }
    // The same as the in-process calls on the run analysed here.
    const direct = meshRunForView({ bs: plain.bs, report: plain.report }, DEFAULT_SETTINGS);
    assert.deepEqual(Array.from(direct.meshPoints!.irreducible), Array.from(local.meshPoints!.irreducible));
    const job = runMeshViewJob({ kind: 'meshView', run: { bs: plain.bs, report: plain.report }, settings: DEFAULT_SETTINGS });
    assert.deepEqual(reportToJson(job.report), reportToJson(local.report));
  });

  it('a mesh of more irreducible points than the limit opens as its points, saying why (the limit is larger on the worker)', async () => {
    const plain = await runAnalysisJob(meshJob(false));
    const n = plain.bs.nk;
    const small = meshRunForView({ bs: plain.bs, report: structuredClone(plain.report) }, DEFAULT_SETTINGS, n - 1);
    assert.equal(small.bs, plain.bs);
    assert.ok(
      small.report.warnings.some((w) =>
        w.startsWith(`The interpolated bands are not drawn along a path for more than ${n - 1} irreducible k-points (${n} here)`),
      ),
    );
    assert.equal(meshRunForView({ bs: plain.bs, report: structuredClone(plain.report) }, DEFAULT_SETTINGS, n).bs.sampling, 'path');
    assert.ok(MAX_WORKER_VIEW_POINTS > MAX_PATH_VIEW_POINTS);
  });

  it('tells a mesh run from a path run without fitting anything (isMeshRun)', async () => {
    assert.equal(isMeshRun((await runAnalysisJob(meshJob(false))).bs), true);
    assert.equal(isMeshRun((await loadSi()).bs), false); // the demo silicon path run
  });
});
