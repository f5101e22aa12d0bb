/** `valleyscope annotate <file-or-folder>… [analysis options]`: write or update `<data file>.valleys.json`. */
import { dirname, relative, resolve } from 'node:path';
import { alatFlag, flag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { locateRun, readLocated } from '../../core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS, type AnalysisSettings } from '../../core/analysis/analyze';
import { annotationsPathFor, emptyExtra } from '../../core/annotations/annotationsModel';
import { composeAnnotations, readExistingAnnotations } from '../../core/annotations/composeAnnotations';
import { contentStamp } from '../../core/annotations/atomicWrite';
import { analysisSettingsOf } from '../../core/annotations/buildAnnotations';
import type { MergeSummary } from '../../core/annotations/mergeAnnotations';
import { compareAnnotations, EXACT_TOLERANCES } from '../../core/annotations/compareAnnotations';
import { ReaderError, ValleyscopeError } from '../../core/errors';
import { nodeAtomicWriter, WriteConflictError, type SafeWriteOptions } from '../safeWrite';
import { ANALYSIS_FLAGS, READ_FLAGS, analysisSettingsFromArgs } from './analyze';
import type { CliIO } from '../io';
import type { ReadOptions } from '../../core/formats/types';
import type { AnnotatedSettings, AnnotatedSource } from '../../core/annotations/annotationsModel';
import { sha256Hex } from '../../core/hash';
import { readStructureFile } from '../../core/formats/structureFile';
import { READ_LIMITS } from '../../core/io/readLimits';
import { checkConfined, checkRecordedPath, notRegularSentence, readRecordedPath, redactContent, shown } from '../../core/io/pathPolicy';
import { BATCH_FLAGS, BATCH_HELP, batchOptionsFromArgs } from '../batch/batchOptions';
import { annotateBatch } from '../batch/commands';

export const ANNOTATE_HELP = `valleyscope annotate <file-or-folder>... [options]
  Analyse each run and write its findings to <data file>.valleys.json beside the data file, for review.
  An existing annotations file is merged, never overwritten: notes, review statuses and fields added by
  hand are kept, entries the analysis no longer finds are kept and marked "found": false. Prints what
  changed. Without options, the settings recorded in an existing file are used again.
  --window <meV>, --method <name>, --range <eV>, --soc, --alat <length+unit>, --structure <file>
                    as for "valleyscope analyze"; all are recorded, and "check" reads the run alike
${BATCH_HELP}
  With any of these three, folders are searched for run folders and the runs are annotated in parallel.`;

import { TOOL_VERSION } from '../../core/version';

export { TOOL_VERSION };

type ReadSettings = Pick<AnnotatedSettings, 'forceSpinorbit' | 'alat_angstrom' | 'structureFile'>;

/**
 * How to read a run so that it reads as it did when annotated: spin-orbit on request, alat, and a structure
 * file given by the user (its path relative to the annotations file's folder; it becomes a source with its
 * hash, so a changed structure file makes the annotations stale). Only ever read, never written.
 *
 * The structure file recorded in an annotations file is opened only inside the run's folder (the annotations
 * file's folder), as io/pathPolicy.ts allows; `fromCommandLine` is the path the user typed with
 * `--structure`, which may be anywhere (still a regular file within its size limit).
 */
export async function readOptionsFor(
  annotationsFile: string,
  s: ReadSettings,
  fromCommandLine?: string,
): Promise<{ options: ReadOptions; sources: AnnotatedSource[] }> {
  const options: ReadOptions = {};
  const sources: AnnotatedSource[] = [];
  if (s.forceSpinorbit) options.spinorbit = true;
  if (s.alat_angstrom !== null) options.alatAngstrom = s.alat_angstrom;
  if (s.structureFile !== null) {
    let file: { path: string; bytes: Uint8Array } | null;
    if (fromCommandLine !== undefined) {
      if (!(await nodeFileAccessor.stat(fromCommandLine))) throw new ValleyscopeError(`--structure: ${fromCommandLine}: no such file`);
      file = { path: fromCommandLine, bytes: await nodeFileAccessor.readFile(fromCommandLine, READ_LIMITS.structure) };
    } else {
      file = await readRecordedPath(
        nodeFileAccessor,
        dirname(annotationsFile),
        s.structureFile,
        'settings.structureFile',
        annotationsFile,
        'structure',
      );
      if (!file)
        throw new ValleyscopeError(
          `the structure file ${shown(s.structureFile)} recorded in ${annotationsFile} (settings.structureFile) is missing`,
        );
    }
    let st;
    try {
      st = readStructureFile(file);
    } catch (e) {
      // The user did not name a recorded structure file in this command: its content is never quoted.
      if (fromCommandLine === undefined && e instanceof ReaderError) throw new ReaderError(e.format, e.file, e, redactContent(e.reason));
      throw e;
    }
    options.structure = st.structure;
    if (options.alatAngstrom === undefined && st.alat_angstrom !== null) options.alatAngstrom = st.alat_angstrom;
    sources.push({ path: s.structureFile, role: 'structure', sha256: sha256Hex(file.bytes), extra: emptyExtra() });
  }
  return { options, sources };
}

/** The existing annotations file beside the data: read only when it stays in that folder and is a regular file. */
async function readIfPresent(path: string): Promise<Uint8Array | null> {
  const st = await nodeFileAccessor.stat(path);
  if (!st) return null;
  if (st.type !== 'file')
    throw new ValleyscopeError(notRegularSentence(path, st, 'the annotations file') + '; remove it to write annotations there');
  await checkConfined(nodeFileAccessor, dirname(path), path, 'the annotations file', 'annotations');
  return nodeFileAccessor.readFile(path, READ_LIMITS.annotations);
}

/** Would the path policy open this recorded path (relative, no "..", nothing hidden)? */
function isInsideRunFolder(recorded: string): boolean {
  try {
    checkRecordedPath(recorded, 'settings.structureFile', 'the annotations file');
    return true;
  } catch {
    return false;
  }
}

export interface ReadFlags {
  soc: boolean;
  alat?: number;
  /** As the user typed it (relative to the working folder). */
  structure?: string;
}

/** `faults` lets tests interrupt or race the write (see safeWrite.ts); the CLI never passes it. */
export async function annotateOne(
  path: string,
  flags: Partial<AnalysisSettings>,
  read: ReadFlags,
  io: CliIO,
  faults: Pick<SafeWriteOptions, 'beforeRename' | 'fs'> = {},
): Promise<void> {
  const loc = await locateRun(nodeFileAccessor, path);
  // The target is derived from the data file's own path only.
  const target = annotationsPathFor(loc.file);
  const oldBytes = await readIfPresent(target);
  const oldText = oldBytes === null ? null : new TextDecoder().decode(oldBytes);
  const readWarnings: string[] = [];
  let older = null;
  if (oldText !== null) {
    try {
      older = readExistingAnnotations(oldText, target, readWarnings);
    } catch (e) {
      if (e instanceof ValleyscopeError)
        throw new ValleyscopeError(`${e.message}. The annotations file was left as it is; fix it (or move it away) and run annotate again`);
      throw e;
    }
  }
  const settings: AnalysisSettings = { ...DEFAULT_SETTINGS, ...(older ? analysisSettingsOf(older) : {}), ...flags };
  const readSettings: ReadSettings = {
    forceSpinorbit: read.soc || (older?.settings.forceSpinorbit ?? false),
    alat_angstrom: read.alat ?? older?.settings.alat_angstrom ?? null,
    structureFile:
      read.structure !== undefined
        ? relative(dirname(resolve(target)), resolve(read.structure)).replace(/\\/g, '/')
        : (older?.settings.structureFile ?? null),
  };
  if (read.structure !== undefined && readSettings.structureFile !== null && !isInsideRunFolder(readSettings.structureFile)) {
    io.err(
      `valleyscope: ${target}: the structure file ${read.structure} is outside the run's folder; it is recorded, but "valleyscope check" ` +
        `and later runs of annotate open recorded paths only inside the run's folder (SECURITY.md): copy it beside the data file to keep the run checkable`,
    );
  }
  const { options, sources } = await readOptionsFor(target, readSettings, read.structure);
  const bs = await readLocated(nodeFileAccessor, loc, options);
  // Fits a reviewer chose (entries with "fit") are redone with their own window and method, as check does.
  const composed = composeAnnotations({
    bs,
    report: analyzeBandStructure(bs, settings),
    source: bs.source,
    settings: { ...settings, ...readSettings },
    toolVersion: TOOL_VERSION,
    fits: [],
    extraSources: sources,
    existingText: oldText,
    existingName: target,
    existingDoc: older,
  });
  const { doc, text } = composed;
  for (const w of readWarnings) io.err(`valleyscope: ${target}: ${w}`);
  if (text === oldText) {
    io.out(`${target}: unchanged (${doc.entries.length} entries)`);
    return;
  }
  const written = await nodeAtomicWriter(faults).writeIfUnchanged(target, new TextEncoder().encode(text), contentStamp(oldBytes));
  if (written === 'changed-on-disk') throw new WriteConflictError(target);
  if (!older) {
    io.out(
      `${target}: created with ${doc.entries.length} entries${doc.entries.length ? ` (${doc.entries.map((e) => e.id).join(', ')})` : ''}`,
    );
    return;
  }
  const summary = composed.summary!;
  const changes = compareAnnotations(older, doc, EXACT_TOLERANCES);
  io.out(
    `${target}: updated; ${changes.length === 0 ? 'no recorded number moved (fit details, warnings or layout only)' : `${changes.length} change${changes.length === 1 ? '' : 's'}`}${reviewSentence(summary)}`,
  );
  for (const c of changes) io.out(`  ${c.message}`);
  for (const f of summary.moved.filter((x) => x.reviewed)) io.out(`  moved (note and status kept): ${f.from} → ${f.to}`);
  for (const f of summary.folded.filter((x) => x.reviewed))
    io.out(`  folded into one entry (the run is no longer spin-polarised): ${f.from} → ${f.to}`);
  for (const f of summary.orphaned.filter((x) => x.reviewed)) io.out(`  orphaned (kept with "found": false): ${f.from}`);
}

const entries = (n: number): string => `${n} entr${n === 1 ? 'y' : 'ies'}`;

/** What happened to the reviewed entries (a note, or a status other than unreviewed), counted truthfully. */
export function reviewSentence(s: MergeSummary): string {
  const n = (list: { reviewed: boolean }[]): number => list.filter((x) => x.reviewed).length;
  const parts = [
    n(s.kept) ? `${n(s.kept)} kept` : '',
    n(s.moved) ? `${n(s.moved)} moved to a new id` : '',
    n(s.folded) ? `${n(s.folded)} folded into another` : '',
    n(s.orphaned) ? `${n(s.orphaned)} orphaned (no longer found)` : '',
  ].filter(Boolean);
  const total = n(s.kept) + n(s.moved) + n(s.folded) + n(s.orphaned);
  return total ? `; reviewed ${entries(total)}: ${parts.join(', ')}` : '';
}

export async function runAnnotate(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { ...ANALYSIS_FLAGS, ...READ_FLAGS, ...BATCH_FLAGS });
  const batch = batchOptionsFromArgs(p);
  if (p.positional.length === 0) throw new UsageError('annotate needs at least one data file or run folder');
  const flags = analysisSettingsFromArgs(p);
  const read: ReadFlags = { soc: p.flags.has('soc') };
  const alat = alatFlag(p);
  if (alat !== undefined) read.alat = alat;
  const structure = flag(p, 'structure');
  if (structure !== undefined) read.structure = structure;
  if (batch.requested) return annotateBatch(p.positional, flags, read, batch, io);
  let failed = 0;
  for (const path of p.positional) {
    try {
      await annotateOne(path, flags, read, io);
    } catch (e) {
      // With several runs, one failure does not stop the others; it is reported and the exit code says so.
      if (p.positional.length === 1 || !(e instanceof ValleyscopeError)) throw e;
      io.err(`valleyscope: ${e.message}`);
      failed++;
    }
  }
  return failed > 0 ? 1 : 0;
}
