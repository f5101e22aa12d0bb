/** `valleyscope annotate <file-or-folder>… [analysis options]`: write or update `<data file>.valleys.json`. */
import { dirname, join, relative, resolve } from 'node:path';
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { locateRun, readLocated } from '../../core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS, type AnalysisSettings } from '../../core/analysis/analyze';
import { annotationsPathFor, emptyExtra } from '../../core/annotations/annotationsModel';
import { parseAnnotations } from '../../core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../core/annotations/serializeAnnotations';
import { analysisSettingsOf, buildAnnotations } from '../../core/annotations/buildAnnotations';
import { mergeAnnotations } from '../../core/annotations/mergeAnnotations';
import { compareAnnotations, EXACT_TOLERANCES } from '../../core/annotations/compareAnnotations';
import { ValleyscopeError } from '../../core/errors';
import { writeFileSafely, type SafeWriteOptions } from '../safeWrite';
import { ANALYSIS_FLAGS, READ_FLAGS, analysisSettingsFromArgs } from './analyze';
import type { CliIO } from '../io';
import type { ReadOptions } from '../../core/formats/types';
import type { AnnotatedSettings, AnnotatedSource } from '../../core/annotations/annotationsModel';
import { readPoscar } from '../../core/formats/vasp/poscar';
import { sha256Hex } from '../../core/hash';
import { BATCH_FLAGS, BATCH_HELP, batchOptionsFromArgs } from '../batch/batchOptions';
import { annotateBatch } from '../batch/commands';

export const ANNOTATE_HELP = `valleyscope annotate <file-or-folder>... [options]
  Analyse each run and write its findings to <data file>.valleys.json beside the data file, for review.
  An existing annotations file is merged, never overwritten: notes, review statuses and fields added by
  hand are kept, entries the analysis no longer finds are kept and marked "found": false. Prints what
  changed. Without options, the settings recorded in an existing file are used again.
  --window <meV>, --method <name>, --range <eV>, --soc, --alat <Å>, --structure <file>
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
 */
export async function readOptionsFor(annotationsFile: string, s: ReadSettings): Promise<{ options: ReadOptions; sources: AnnotatedSource[] }> {
  const options: ReadOptions = {};
  const sources: AnnotatedSource[] = [];
  if (s.forceSpinorbit) options.spinorbit = true;
  if (s.alat_angstrom !== null) options.alatAngstrom = s.alat_angstrom;
  if (s.structureFile !== null) {
    const path = join(dirname(annotationsFile), s.structureFile);
    if (!(await nodeFileAccessor.stat(path))) {
      throw new ValleyscopeError(`the structure file ${s.structureFile} recorded in ${annotationsFile} is missing (looked for ${path})`);
    }
    const bytes = await nodeFileAccessor.readFile(path);
    options.structure = readPoscar({ path, bytes });
    sources.push({ path: s.structureFile, role: 'structure', sha256: sha256Hex(bytes), extra: emptyExtra() });
  }
  return { options, sources };
}

async function readIfPresent(path: string): Promise<Uint8Array | null> {
  const st = await nodeFileAccessor.stat(path);
  if (!st) return null;
  if (st.type !== 'file') throw new ValleyscopeError(`${path} exists but is not a file; remove it to write annotations there`);
  return nodeFileAccessor.readFile(path);
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
      older = parseAnnotations(oldText, target, readWarnings);
    } catch (e) {
      if (e instanceof ValleyscopeError) throw new ValleyscopeError(`${e.message}. The annotations file was left as it is; fix it (or move it away) and run annotate again`);
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
  const { options, sources } = await readOptionsFor(target, readSettings);
  const bs = await readLocated(nodeFileAccessor, loc, options);
  const report = analyzeBandStructure(bs, settings);
  const fresh = buildAnnotations(report, bs.source, { ...settings, ...readSettings }, { toolVersion: TOOL_VERSION });
  fresh.sources.push(...sources);
  const doc = older ? mergeAnnotations(older, fresh) : fresh;
  const text = serializeAnnotations(doc);
  for (const w of readWarnings) io.err(`valleyscope: ${target}: ${w}`);
  if (text === oldText) {
    io.out(`${target}: unchanged (${doc.entries.length} entries)`);
    return;
  }
  await writeFileSafely(target, text, { ...faults, expectExisting: oldBytes });
  if (!older) {
    io.out(`${target}: created with ${doc.entries.length} entries${doc.entries.length ? ` (${doc.entries.map((e) => e.id).join(', ')})` : ''}`);
    return;
  }
  const changes = compareAnnotations(older, doc, EXACT_TOLERANCES);
  const kept = doc.entries.filter((e) => e.note !== '' || e.status !== 'unreviewed').length;
  io.out(`${target}: updated; ${changes.length === 0 ? 'no recorded number moved (fit details, warnings or layout only)' : `${changes.length} change${changes.length === 1 ? '' : 's'}`}${kept ? `; notes and statuses of ${kept} entr${kept === 1 ? 'y' : 'ies'} kept` : ''}`);
  for (const c of changes) io.out(`  ${c.message}`);
}

export async function runAnnotate(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { ...ANALYSIS_FLAGS, ...READ_FLAGS, ...BATCH_FLAGS });
  const batch = batchOptionsFromArgs(p);
  if (p.positional.length === 0) throw new UsageError('annotate needs at least one data file or run folder');
  const flags = analysisSettingsFromArgs(p);
  const read: ReadFlags = { soc: p.flags.has('soc') };
  const alat = numberFlag(p, 'alat', (x) => x > 0 && x < 1000, 'a positive length in Å');
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
