/**
 * `valleyscope check [paths…] [--format text|md]`: find annotations files, re-read their data, re-analyse
 * with the recorded settings, and exit non-zero when any is stale (a source file changed) or drifted (a
 * recorded number moved beyond the tolerance). Made for a repository's CI.
 */
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { locateRun, readLocated } from '../../core/load';
import { analyzeBandStructure } from '../../core/analysis/analyze';
import { joinPath } from '../../core/io/fileAccessor';
import { dataPathFor, isAnnotationsPath, annotationsPathFor, type AnnotationsDoc } from '../../core/annotations/annotationsModel';
import { parseAnnotations } from '../../core/annotations/parseAnnotations';
import { analysisSettingsOf, annotatedSources } from '../../core/annotations/buildAnnotations';
import { checkAnnotations, type CheckResult } from '../../core/annotations/checkAnnotations';
import { DEFAULT_TOLERANCES, type Tolerances } from '../../core/annotations/compareAnnotations';
import { annotationsMarkdown } from '../../core/annotations/annotationsMarkdown';
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
  --format <text|md>          plain lines (default) or a Markdown summary for a review comment
  --energy-tolerance <meV>    energies may move this much (default ${DEFAULT_TOLERANCES.energy_meV})
  --mass-tolerance <percent>  masses may move this much (default ${DEFAULT_TOLERANCES.mass_percent})
${BATCH_HELP}
  Paths ending in .jsonl are the --jsonl output of check (the shards of a job array): they are merged and
  reported as one run over all the files would report them.`;

/** Folders never searched: version control and installed packages. */
const SKIP_DIRS = new Set(['.git', '.hg', '.svn', 'node_modules']);

/** Annotations files under `path` (or the annotations file of a data file), sorted. */
export async function findAnnotationsFiles(path: string): Promise<string[]> {
  const st = await nodeFileAccessor.stat(path);
  if (!st) throw new ValleyscopeError(`${path}: no such file or folder`);
  if (st.type === 'file') {
    if (isAnnotationsPath(path)) return [path];
    const beside = annotationsPathFor(path);
    if (await nodeFileAccessor.stat(beside)) return [beside];
    throw new ValleyscopeError(`${path} is neither an annotations file (*.valleys.json) nor a data file with one beside it`);
  }
  const out: string[] = [];
  const walk = async (dir: string, depth: number): Promise<void> => {
    if (depth > 32) return;
    const entries = (await nodeFileAccessor.list(dir)).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const p = joinPath(dir, e.name);
      if (e.type === 'directory') {
        if (!SKIP_DIRS.has(e.name)) await walk(p, depth + 1);
      } else if (isAnnotationsPath(e.name) && !e.name.startsWith('.')) {
        out.push(p);
      }
    }
  };
  await walk(path, 0);
  return out;
}

export type FileOutcome =
  | { file: string; doc: AnnotationsDoc; result: CheckResult; error: null }
  | { file: string; doc: AnnotationsDoc | null; result: null; error: string };

/** Check one annotations file against its data (the data file is the annotations file's name minus the suffix). */
export async function checkFile(file: string, tol: Tolerances): Promise<FileOutcome> {
  let doc: AnnotationsDoc | null = null;
  try {
    doc = parseAnnotations(new TextDecoder().decode(await nodeFileAccessor.readFile(file)), file);
    const dataFile = dataPathFor(file);
    if (!(await nodeFileAccessor.stat(dataFile))) {
      return { file, doc, result: null, error: `the data file ${dataFile} it describes is missing` };
    }
    const loc = await locateRun(nodeFileAccessor, dataFile);
    const { options, sources } = await readOptionsFor(file, doc.settings);
    const bs = await readLocated(nodeFileAccessor, loc, options);
    const report = analyzeBandStructure(bs, analysisSettingsOf(doc));
    return { file, doc, result: checkAnnotations(doc, [...annotatedSources(bs.source), ...sources], report, tol), error: null };
  } catch (e) {
    if (e instanceof ValleyscopeError) return { file, doc, result: null, error: e.message };
    const code = (e as NodeJS.ErrnoException | undefined)?.code;
    if (code) return { file, doc, result: null, error: `${file}: ${(e as Error).message}` };
    throw e;
  }
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

function markdownReport(outcomes: FileOutcome[]): string {
  const parts = [`**Valleyscope check:** ${summaryLine(outcomes)}`, ''];
  for (const o of outcomes) {
    if (o.error !== null) {
      parts.push(`### Valleyscope annotations: \`${o.file.replace(/`/g, "'")}\` — **could not be checked**`, '', o.error.replace(/\|/g, '\\|'), '');
    } else {
      parts.push(annotationsMarkdown(o.doc, o.file, o.result));
    }
  }
  return parts.join('\n');
}

export async function runCheck(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { format: { value: true }, 'energy-tolerance': { value: true }, 'mass-tolerance': { value: true }, ...BATCH_FLAGS });
  const batch = batchOptionsFromArgs(p);
  const format = flag(p, 'format') ?? 'text';
  if (format !== 'text' && format !== 'md') throw new UsageError(`--format must be text or md, got "${format}"`);
  const tol: Tolerances = {
    ...DEFAULT_TOLERANCES,
    energy_meV: numberFlag(p, 'energy-tolerance', (x) => x >= 0 && x <= 1e4, 'zero or a positive number of meV') ?? DEFAULT_TOLERANCES.energy_meV,
    mass_percent: numberFlag(p, 'mass-tolerance', (x) => x >= 0 && x <= 1000, 'zero or a positive per cent') ?? DEFAULT_TOLERANCES.mass_percent,
  };
  const roots = p.positional.length ? p.positional : ['.'];
  let outcomes: FileOutcome[];
  if (roots.some(isJsonLinesPath)) {
    // The shards of a job array, merged: the same outcomes, in the same order, as one machine's run.
    if (!roots.every(isJsonLinesPath)) throw new UsageError('give either JSON Lines files (*.jsonl) of earlier checks or folders to check, not both');
    if (batch.shard) throw new UsageError('--shard selects runs to check, not records of JSON Lines files');
    outcomes = outcomesFromRecords(await readJsonLines(nodeFileAccessor, roots));
  } else {
    const files: string[] = [];
    for (const r of roots) for (const f of await findAnnotationsFiles(r)) if (!files.includes(f)) files.push(f);
    if (files.length === 0) {
      io.err(`valleyscope check: no annotations files (*.valleys.json) under ${roots.join(', ')}; write some with "valleyscope annotate"`);
      return 1;
    }
    const mine = files.filter((f) => inShard(f, batch.shard));
    if (batch.shard) io.err(`valleyscope: shard ${batch.shard.index}/${batch.shard.count}: ${mine.length} of the ${files.length} annotations files`);
    outcomes = await checkInPool(mine, tol, batch, io);
  }
  if (batch.jsonl) for (const o of outcomes) io.out(JSON.stringify(checkRecord(o)));
  else io.out(format === 'md' ? markdownReport(outcomes) : textReport(outcomes));
  return outcomes.every((o) => o.result?.ok) ? 0 : 1;
}
