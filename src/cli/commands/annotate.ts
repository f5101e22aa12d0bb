/** `valleyscope annotate <file-or-folder>… [analysis options]`: write or update `<data file>.valleys.json`. */
import { parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { locateRun, readLocated } from '../../core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS, type AnalysisSettings } from '../../core/analysis/analyze';
import { annotationsPathFor } from '../../core/annotations/annotationsModel';
import { parseAnnotations } from '../../core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../core/annotations/serializeAnnotations';
import { analysisSettingsOf, buildAnnotations } from '../../core/annotations/buildAnnotations';
import { mergeAnnotations } from '../../core/annotations/mergeAnnotations';
import { compareAnnotations, EXACT_TOLERANCES } from '../../core/annotations/compareAnnotations';
import { ValleyscopeError } from '../../core/errors';
import { writeFileSafely } from '../safeWrite';
import { ANALYSIS_FLAGS, analysisSettingsFromArgs } from './analyze';
import type { CliIO } from '../io';

export const ANNOTATE_HELP = `valleyscope annotate <file-or-folder>... [options]
  Analyse each run and write its findings to <data file>.valleys.json beside the data file, for review.
  An existing annotations file is merged, never overwritten: notes, review statuses and fields added by
  hand are kept, entries the analysis no longer finds are kept and marked "found": false. Prints what
  changed. Without options, the settings recorded in an existing file are used again.
  --window <meV>, --method <name>, --range <eV>, --soc   as for "valleyscope analyze"`;

declare const __VERSION__: string | undefined;
export const TOOL_VERSION = typeof __VERSION__ === 'string' ? __VERSION__ : '0.1.0';

async function readIfPresent(path: string): Promise<Uint8Array | null> {
  const st = await nodeFileAccessor.stat(path);
  if (!st) return null;
  if (st.type !== 'file') throw new ValleyscopeError(`${path} exists but is not a file; remove it to write annotations there`);
  return nodeFileAccessor.readFile(path);
}

export async function annotateOne(path: string, flags: Partial<AnalysisSettings>, soc: boolean, io: CliIO): Promise<void> {
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
  const forceSpinorbit = soc || (older?.settings.forceSpinorbit ?? false);
  const bs = await readLocated(nodeFileAccessor, loc, forceSpinorbit ? { spinorbit: true } : {});
  const report = analyzeBandStructure(bs, settings);
  const fresh = buildAnnotations(report, bs.source, { ...settings, forceSpinorbit }, { toolVersion: TOOL_VERSION });
  const doc = older ? mergeAnnotations(older, fresh) : fresh;
  const text = serializeAnnotations(doc);
  for (const w of readWarnings) io.err(`valleyscope: ${target}: ${w}`);
  if (text === oldText) {
    io.out(`${target}: unchanged (${doc.entries.length} entries)`);
    return;
  }
  await writeFileSafely(target, text, { expectExisting: oldBytes });
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
  const p = parseArgs(argv, { ...ANALYSIS_FLAGS });
  if (p.positional.length === 0) throw new UsageError('annotate needs at least one data file or run folder');
  const flags = analysisSettingsFromArgs(p);
  let failed = 0;
  for (const path of p.positional) {
    try {
      await annotateOne(path, flags, p.flags.has('soc'), io);
    } catch (e) {
      // With several runs, one failure does not stop the others; it is reported and the exit code says so.
      if (p.positional.length === 1 || !(e instanceof ValleyscopeError)) throw e;
      io.err(`valleyscope: ${e.message}`);
      failed++;
    }
  }
  return failed > 0 ? 1 : 0;
}
