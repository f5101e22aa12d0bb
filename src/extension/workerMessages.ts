/** What the host asks the analysis worker, and what the worker sends back. */
import type { BandStructure, Report } from '../core/model';
import type { MeshPointsWithEnergies } from '../core/interpolation/meshPointsOnPath';
import type { AnalysisJob, JobError, MeshViewJob } from './analysisJob';

/** A file to read and analyse, or a run already analysed to turn into the band view's picture. */
export type WorkerRequest = AnalysisJob | MeshViewJob;

export type WorkerReply =
  | { type: 'progress'; fraction: number }
  | { type: 'done'; bs: BandStructure; report: Report; meshPoints?: MeshPointsWithEnergies }
  | { type: 'failed'; error: JobError };

export function isMeshViewJob(r: WorkerRequest): r is MeshViewJob {
  return 'kind' in r && r.kind === 'meshView';
}
