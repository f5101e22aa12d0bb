/**
 * One unit of batch work (one run to analyse or annotate, one annotations file to check) and how it is done.
 * The same function runs in a worker thread of the pool and, with one job, in the main thread, so the result
 * does not depend on --jobs. It never throws: a failure is a result carrying an error sentence.
 */
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun, readLocated } from '../../core/load';
import { readerById } from '../../core/formats/index';
import type { FoundFile } from './findRuns';
import { analyzeBandStructure, type AnalysisSettings } from '../../core/analysis/analyze';
import { runCrystal } from '../../core/compare/dataRunInput';
import { isValleyscopeError } from '../../core/errors';
import type { ReadOptions } from '../../core/formats/types';
import type { Tolerances } from '../../core/annotations/compareAnnotations';
import type { EnergyZeroMode } from '../../core/report/energyZero';
import { analysisJson } from '../analysisJson';
import { checkFile, type FileOutcome } from '../commands/check';
import { annotateOne, type ReadFlags } from '../commands/annotate';

export type BatchTask =
  /** `found`: the eigenvalue file and its reader when the runs were searched (not looked for again). */
  | { kind: 'analyze'; path: string; settings: Partial<AnalysisSettings>; read: ReadOptions; zero?: EnergyZeroMode; found?: FoundFile }
  /** `root`: the folder searched when the file was found by searching (it must stay inside it), null when named. */
  | { kind: 'check'; path: string; tolerances: Tolerances; root: string | null }
  | { kind: 'annotate'; path: string; settings: Partial<AnalysisSettings>; read: ReadFlags };

export type BatchResult =
  /** `line`: the JSON Lines record, already as text (a string crosses from a worker far faster than an object tree). */
  | { kind: 'analyze'; path: string; line: string; failed: boolean }
  | { kind: 'check'; path: string; outcome: FileOutcome; failed: boolean }
  | { kind: 'annotate'; path: string; out: string[]; err: string[]; error: string | null; failed: boolean };

/** A sentence for any failure: the tool's own errors as they are, system errors with their message, the rest marked internal. */
export function failureSentence(e: unknown, path: string): string {
  if (isValleyscopeError(e)) return e.message;
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  if (code && typeof (e as Error).message === 'string') return `${path}: ${(e as Error).message}`;
  return `internal error while processing ${path}: ${(e as Error)?.message ?? String(e)}. Please report this with the input file`;
}

/** The JSON Lines record of an analysed run: `path`, the `--json` contract, and what `compare` needs to match valleys up to symmetry. */
async function analyzeLine(
  path: string,
  settings: Partial<AnalysisSettings>,
  read: ReadOptions,
  zero: EnergyZeroMode,
  found?: FoundFile,
): Promise<Record<string, unknown>> {
  // The eigenvalue file and reader found when the runs were searched, when known (what loadRun would find for
  // that file): the file is not opened and recognised a second time.
  const reader = found && readerById(found.readerId);
  // The line prints no file hash (the --json contract): the readers need not compute one.
  const options = { ...read, hashSources: false };
  const bs = reader
    ? await readLocated(nodeFileAccessor, { file: found.file, reader, others: found.others ?? [] }, options)
    : await loadRun(nodeFileAccessor, path, options);
  const report = analyzeBandStructure(bs, settings);
  return { path, ...analysisJson(bs, report, zero), lattice: bs.lattice, rotations: runCrystal(bs.structure).rotations };
}

export async function runTask(task: BatchTask): Promise<BatchResult> {
  const { path } = task;
  switch (task.kind) {
    case 'analyze':
      try {
        return {
          kind: 'analyze',
          path,
          line: JSON.stringify(await analyzeLine(path, task.settings, task.read, task.zero ?? 'vbm', task.found)),
          failed: false,
        };
      } catch (e) {
        return { kind: 'analyze', path, line: JSON.stringify({ path, error: failureSentence(e, path) }), failed: true };
      }
    case 'check': {
      let outcome: FileOutcome;
      try {
        outcome = await checkFile(path, task.tolerances, task.root);
      } catch (e) {
        outcome = { file: path, doc: null, result: null, error: failureSentence(e, path) };
      }
      return { kind: 'check', path, outcome, failed: outcome.error !== null };
    }
    case 'annotate': {
      const out: string[] = [];
      const err: string[] = [];
      const io = { out: (t: string) => void out.push(t), err: (t: string) => void err.push(t) };
      try {
        await annotateOne(path, task.settings, task.read, io);
        return { kind: 'annotate', path, out, err, error: null, failed: false };
      } catch (e) {
        return { kind: 'annotate', path, out, err, error: failureSentence(e, path), failed: true };
      }
    }
  }
}
