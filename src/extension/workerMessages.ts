/** What the analysis worker sends back to the host. */
import type { BandStructure, Report } from '../core/model';
import type { JobError } from './analysisJob';

export type WorkerReply =
  { type: 'progress'; fraction: number } | { type: 'done'; bs: BandStructure; report: Report } | { type: 'failed'; error: JobError };
