/** The demo silicon run (fixtures/demo/si-bulk: Cohen–Bergstresser EPM bands in EIGENVAL layout), loaded as the CLI does. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import type { AnalysisJob } from '../../../src/extension/analysisJob';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { loadRun } from '../../../src/core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import type { ComposeInput } from '../../../src/core/annotations/composeAnnotations';

export const SI_DIR = join(__dirname, '../../../fixtures/demo/si-bulk');
export const SI_EIGENVAL = join(SI_DIR, 'EIGENVAL');

export async function loadSi() {
  await ensureSymmetryReady();
  const bs = await loadRun(nodeFileAccessor, SI_EIGENVAL);
  const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
  const geometry = pathGeometry(bs);
  const text = readFileSync(SI_EIGENVAL, 'utf8');
  return { bs, report, geometry, text };
}

/** What composing the demo run's annotations file starts from: the analysis at the defaults, no fits, no file yet. */
export function composeInputOf(si: Awaited<ReturnType<typeof loadSi>>): ComposeInput {
  return {
    bs: si.bs,
    report: si.report,
    source: si.bs.source,
    settings: DEFAULT_SETTINGS,
    toolVersion: '0.1.0',
    fits: [],
    existingText: null,
    existingName: 'EIGENVAL.valleys.json',
  };
}

/** The host's analysis job for the files of a run folder (the main file, then its companions), read whole. */
export function folderJob(dir: string, main: string, companions: string[], forView = false): AnalysisJob {
  const read = (n: string) => ({ path: join(dir, n), bytes: new Uint8Array(readFileSync(join(dir, n))) });
  const job: AnalysisJob = {
    readerId: 'vasp-eigenval',
    main: read(main),
    companions: companions.map(read),
    read: { allowPartial: true },
    settings: DEFAULT_SETTINGS,
  };
  if (forView) job.forView = true;
  return job;
}

/** The analysis worker from its TypeScript source, compiled on the fly by tsx's require hook (the bundle does this at build time). */
export function analysisWorkerThread(): Worker {
  const entry = join(__dirname, '../../../src/extension/analysisWorker.ts');
  return new Worker(`require('tsx/cjs/api').register(); require(${JSON.stringify(entry)});`, { eval: true });
}
