/**
 * `valleyscope check [paths…] [--format text|md]`: find annotations files, re-read their data, re-analyse
 * with the recorded settings, and exit non-zero when any is stale (a source file changed) or drifted (a
 * recorded number moved beyond the tolerance). Made for a repository's CI.
 */
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { locateRun, readLocated } from '../../core/load';
import { dirname, joinPath } from '../../core/io/fileAccessor';
import { checkConfined } from '../../core/io/pathPolicy';
import { READ_LIMITS } from '../../core/io/readLimits';
import { fsErrorCode, fsErrorSentence } from '../fsErrors';
import type { InputWarning } from '../../core/model';
import { dataPathFor, isAnnotationsPath, annotationsPathFor, type AnnotationsDoc } from '../../core/annotations/annotationsModel';
import { parseAnnotations } from '../../core/annotations/parseAnnotations';
import { annotatedSources } from '../../core/annotations/buildAnnotations';
import { reanalyzeAsRecorded } from '../../core/annotations/chosenFits';
import { checkAnnotations, type CheckResult } from '../../core/annotations/checkAnnotations';
import { DEFAULT_TOLERANCES, type Tolerances } from '../../core/annotations/compareAnnotations';
import { checkMarkdown } from '../../core/annotations/checkMarkdown';
import { ValleyscopeError } from '../../core/errors';
import type { CliIO } from '../io';
import { readOptionsFor } from './annotate';
import { BATCH_FLAGS, BATCH_HELP, batchOptionsFromArgs } from '../batch/batchOptions';
import { checkInPool } from '../batch/commands';
import { inShard } from '../batch/shard';
import { checkRecord, isJsonLinesPath, outcomesFromRecords, readJsonLines } from '../batch/jsonLines';

export const CHECK_HELP = `valleyscope check [paths...] [options]
  Find *.valleys.json files under the paths (default: the current folder), re-read each data file,
  re-analyse with the settings recorded in the file, and report annotations that are stale (a source
  file's SHA-256 changed) or drifted (a recorded number moved beyond the tolerance). Exits with 1 when
  any is stale, drifted or unreadable, or when no annotations file is found: made for CI.
  The search goes at most 32 folders deep and follows no link to a folder (it says so when it stops).
  Paths read from an annotations file are opened only inside its folder (see SECURITY.md).
  --format <text|md>          plain lines (default) or a Markdown summary for a review comment
  --energy-tolerance <meV>    energies may move this much (default ${DEFAULT_TOLERANCES.energy_meV})
  --mass-tolerance <percent>  masses may move this much (default ${DEFAULT_TOLERANCES.mass_percent})
${BATCH_HELP}
  Paths ending in .jsonl are the --jsonl output of check (the shards of a job array): they are merged and
  reported as one run over all the files would report them.`;

/** Folders never searched: version control and installed packages. */
const SKIP_DIRS = new Set(['.git', '.hg', '.svn', 'node_modules']);

/** How many folders below a given path `check` looks for annotations files. */
export const MAX_SEARCH_DEPTH = 32;

export interface FoundAnnotations {
  file: string;
  /** The folder searched when the file was found by searching (it must stay inside it), null when named. */
  root: string | null;
}

/**
 * Annotations files under `path` (or the annotations file of a data file), sorted, with sentences about what
 * the search left out (the depth limit; links to folders, which are not followed).
 */
export async function searchAnnotationsFiles(path: string): Promise<{ found: FoundAnnotations[]; notes: string[] }> {
  const st = await nodeFileAccessor.stat(path);
  if (!st) throw new ValleyscopeError(`${path}: no such file or folder`);
  if (st.type !== 'directory') {
    if (isAnnotationsPath(path)) return { found: [{ file: path, root: null }], notes: [] };
    const beside = annotationsPathFor(path);
    if (await nodeFileAccessor.stat(beside)) return { found: [{ file: beside, root: null }], notes: [] };
    throw new ValleyscopeError(`${path} is neither an annotations file (*.valleys.json) nor a data file with one beside it`);
  }
  const found: FoundAnnotations[] = [];
  const notes: string[] = [];
  const tooDeep: string[] = [];
  const linkedDirs: string[] = [];
  const walk = async (dir: string, depth: number): Promise<void> => {
    let listed;
    try {
      listed = await nodeFileAccessor.list(dir);
    } catch (e) {
      // A folder below the one named that cannot be listed (permission denied, ...) is said, and skipped.
      if (depth === 0 || !(e instanceof ValleyscopeError)) throw e;
      notes.push(e.message);
      return;
    }
    const entries = listed.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const p = joinPath(dir, e.name);
      if (e.type === 'directory') {
        if (SKIP_DIRS.has(e.name)) continue;
        // Links to folders are not followed: they can lead outside the searched folder or in circles.
        if (e.link) linkedDirs.push(p);
        else if (depth >= MAX_SEARCH_DEPTH) tooDeep.push(p);
        else await walk(p, depth + 1);
      } else if (isAnnotationsPath(e.name) && !e.name.startsWith('.')) {
        found.push({ file: p, root: path });
      }
    }
  };
  await walk(path, 0);
  if (tooDeep.length) {
    notes.push(
      `${path}: the search stopped ${MAX_SEARCH_DEPTH} folders deep; ${tooDeep.length} deeper folder${tooDeep.length === 1 ? ' was' : 's were'} not searched (first: ${tooDeep[0]}); name them on the command line to check them`,
    );
  }
  if (linkedDirs.length) {
    notes.push(
      `${path}: ${linkedDirs.length} symbolic link${linkedDirs.length === 1 ? '' : 's'} to folders ${linkedDirs.length === 1 ? 'was' : 'were'} not followed (first: ${linkedDirs[0]}); name the folder on the command line to check it`,
    );
  }
  return { found, notes };
}

/** Annotations files under `path` (or the annotations file of a data file), sorted. */
export async function findAnnotationsFiles(path: string): Promise<string[]> {
  return (await searchAnnotationsFiles(path)).found.map((f) => f.file);
}

export type FileOutcome =
  | { file: string; doc: AnnotationsDoc; result: CheckResult; error: null }
  | { file: string; doc: AnnotationsDoc | null; result: null; error: string };

/**
 * Check one annotations file against its data (the data file is the annotations file's name minus the
 * suffix). Every path it leads to is opened under the policy of io/pathPolicy.ts: the data file and the
 * recorded structure file only inside the annotations file's folder; an annotations file found by searching
 * only inside the searched folder (`root`).
 */
export async function checkFile(file: string, tol: Tolerances, root: string | null = null): Promise<FileOutcome> {
  let doc: AnnotationsDoc | null = null;
  try {
    if (root !== null) await checkConfined(nodeFileAccessor, root, file, 'the annotations file', 'annotations');
    doc = parseAnnotations(new TextDecoder().decode(await nodeFileAccessor.readFile(file, READ_LIMITS.annotations)), file);
    const dataFile = dataPathFor(file);
    const runFolder = dirname(file);
    if (!(await checkConfined(nodeFileAccessor, runFolder, dataFile, 'the data file it describes', 'data', Number.MAX_SAFE_INTEGER))) {
      return { file, doc, result: null, error: `the data file ${dataFile} it describes is missing` };
    }
    const loc = await locateRun(nodeFileAccessor, dataFile);
    const { options, sources } = await readOptionsFor(file, doc.settings);
    const bs = await readLocated(nodeFileAccessor, loc, options);
    // The recorded settings, and each fit a reviewer chose redone with its own (the one definition of chosenFits.ts).
    const result = checkAnnotations(doc, [...annotatedSources(bs.source), ...sources], reanalyzeAsRecorded(doc, bs), tol);
    return { file, doc, result: await explainUnread(result, file, bs.warnings), error: null };
  } catch (e) {
    if (e instanceof ValleyscopeError) return { file, doc, result: null, error: e.message };
    if (fsErrorCode(e)) return { file, doc, result: null, error: fsErrorSentence(file, e).message };
    throw e;
  }
}

/**
 * A recorded source that the run no longer reads but that is still there was set aside by the reader (it
 * did not parse): say so with the reader's own sentence (file, line, column), not "missing".
 */
async function explainUnread(result: CheckResult, file: string, warnings: readonly InputWarning[]): Promise<CheckResult> {
  const dir = dirname(file);
  const stale = [];
  for (const c of result.stale) {
    if (c.kind !== 'removed' || c.scope !== 'source') {
      stale.push(c);
      continue;
    }
    const path = joinPath(dir, c.subject);
    const st = await nodeFileAccessor.stat(path);
    if (!st || st.type !== 'file') {
      stale.push({ ...c, message: c.message.replace('is no longer read with the run (missing, or no longer used)', 'is missing') });
      continue;
    }
    const why = warnings.find((w) => w.file !== undefined && (w.file === path || w.file.replace(/\\/g, '/').endsWith(`/${c.subject}`)));
    stale.push({
      ...c,
      message: why
        ? c.message.replace('is no longer read with the run (missing, or no longer used)', `exists but could not be read: ${why.message}`)
        : c.message.replace('is no longer read with the run (missing, or no longer used)', 'exists but is no longer used by the reader'),
    });
  }
  return { ...result, stale };
}

function textReport(outcomes: FileOutcome[]): string {
  const lines: string[] = [];
  for (const o of outcomes) {
    if (o.error !== null) {
      lines.push(`FAIL     ${o.file}: could not be checked: ${o.error}`);
      continue;
    }
    const r = o.result;
    if (r.ok) {
      lines.push(`ok       ${o.file} (${o.doc.entries.length} entries, ${o.doc.sources.length} source files unchanged)`);
      continue;
    }
    const what = [r.stale.length ? 'stale' : '', r.drifted.length ? 'drifted' : ''].filter(Boolean).join(', ');
    lines.push(`${what.toUpperCase().padEnd(8)} ${o.file}`);
    for (const c of r.stale) lines.push(`  stale:   ${c.message}`);
    for (const c of r.drifted) lines.push(`  drifted: ${c.message}`);
  }
  lines.push('', summaryLine(outcomes));
  return lines.join('\n');
}

function summaryLine(outcomes: FileOutcome[]): string {
  const ok = outcomes.filter((o) => o.result?.ok).length;
  const bad = outcomes.filter((o) => o.result && !o.result.ok).length;
  const failed = outcomes.filter((o) => o.error !== null).length;
  const n = outcomes.length;
  return `${n} annotations file${n === 1 ? '' : 's'} checked: ${ok} match${ok === 1 ? 'es' : ''} ${ok === 1 ? 'its' : 'their'} data, ${bad} stale or drifted, ${failed} could not be checked.`;
}

function markdownReport(outcomes: FileOutcome[], notes: string[] = []): string {
  const md = checkMarkdown(outcomes, summaryLine(outcomes));
  if (notes.length === 0) return md;
  // What the search could not look at (depth limit, links not followed) goes under the summary line.
  const [first, ...rest] = md.split('\n');
  return [first!, '', ...notes.map((n) => `> ${n.replace(/\|/g, '\\|')}`), ...rest].join('\n');
}

export async function runCheck(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, {
    format: { value: true },
    'energy-tolerance': { value: true },
    'mass-tolerance': { value: true },
    ...BATCH_FLAGS,
  });
  const batch = batchOptionsFromArgs(p);
  const format = flag(p, 'format') ?? 'text';
  if (format !== 'text' && format !== 'md') throw new UsageError(`--format must be text or md, got "${format}"`);
  const tol: Tolerances = {
    ...DEFAULT_TOLERANCES,
    energy_meV:
      numberFlag(p, 'energy-tolerance', (x) => x >= 0 && x <= 1e4, 'zero or a positive number of meV') ?? DEFAULT_TOLERANCES.energy_meV,
    mass_percent:
      numberFlag(p, 'mass-tolerance', (x) => x >= 0 && x <= 1000, 'zero or a positive per cent') ?? DEFAULT_TOLERANCES.mass_percent,
  };
  const roots = p.positional.length ? p.positional : ['.'];
  let outcomes: FileOutcome[];
  let notes: string[] = [];
  if (roots.some(isJsonLinesPath)) {
    // The shards of a job array, merged: the same outcomes, in the same order, as one machine's run.
    if (!roots.every(isJsonLinesPath))
      throw new UsageError('give either JSON Lines files (*.jsonl) of earlier checks or folders to check, not both');
    if (batch.shard) throw new UsageError('--shard selects runs to check, not records of JSON Lines files');
    outcomes = outcomesFromRecords(await readJsonLines(nodeFileAccessor, roots));
  } else {
    const files: FoundAnnotations[] = [];
    for (const r of roots) {
      const s = await searchAnnotationsFiles(r);
      notes = notes.concat(s.notes);
      for (const f of s.found) if (!files.some((g) => g.file === f.file)) files.push(f);
    }
    for (const n of notes) io.err(`valleyscope check: ${n}`);
    if (files.length === 0) {
      io.err(`valleyscope check: no annotations files (*.valleys.json) under ${roots.join(', ')}; write some with "valleyscope annotate"`);
      return 1;
    }
    const mine = files.filter((f) => inShard(f.file, batch.shard));
    if (batch.shard)
      io.err(`valleyscope: shard ${batch.shard.index}/${batch.shard.count}: ${mine.length} of the ${files.length} annotations files`);
    outcomes = await checkInPool(mine, tol, batch, io);
  }
  if (batch.jsonl) for (const o of outcomes) io.out(JSON.stringify(checkRecord(o)));
  else io.out(format === 'md' ? markdownReport(outcomes, notes) : textReport(outcomes));
  return outcomes.every((o) => o.result?.ok) ? 0 : 1;
}
