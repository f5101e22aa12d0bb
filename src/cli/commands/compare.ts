/** `valleyscope compare <runs…> [--reference <run>] [--format table|csv|md|json] [analysis flags]` */
import { flag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun } from '../../core/load';
import { analyzeBandStructure } from '../../core/analysis/analyze';
import { compareRuns, type RunInput } from '../../core/compare/compareRuns';
import { formatComparison, type ComparisonFormat } from '../../core/compare/formatComparison';
import { ensureSymmetryReady } from '../../core/lattice/symmetry';
import { dataRunInput } from '../../core/compare/dataRunInput';
import { ANALYSIS_FLAGS, analysisSettingsFromArgs, energyZeroFromArgs } from './analyze';
import { energyZeroOf, type EnergyZero } from '../../core/report/energyZero';
import { isAnnotationsPath } from '../../core/annotations/annotationsModel';
import { loadAnnotationsRun } from '../../core/compare/loadAnnotationsRun';
import type { CliIO } from '../io';
import { isJsonLinesPath, readJsonLines, runsFromRecords } from '../batch/jsonLines';

export const COMPARE_HELP = `valleyscope compare <run> <run> [...] [options]
  Compare runs (eigenvalue files, run folders, or annotations files *.valleys.json): gap, edges, valleys
  matched up to symmetry, masses, valley degeneracy, and strain relative to the reference run. An
  annotations file gives the numbers the reviewer saved; it is marked stale when its data files changed.
  --reference <run>          the run the differences are taken against (default: the first)
  --format table|csv|md|json table (default); md is ready to paste into a review comment; csv is long
                             form: run,extremum,kind,quantity,direction,branch,value,unit,reference_value,
                             difference,relative_difference (mass differences on |m|)
  --energy-zero vbm|cbm|midgap|fermi|raw   zero of the extrema energies shown (default vbm); json keeps raw
  --window, --method, --range, --soc   as for analyze
  A path ending in .jsonl is the output of "analyze --jsonl" (one run per line; the shards of a job array):
  the runs of all such files are merged in path order and compared as one machine's runs would be.`;

const FORMATS: ComparisonFormat[] = ['table', 'csv', 'md', 'json'];

export async function runCompare(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { reference: { value: true }, format: { value: true }, 'energy-zero': { value: true }, ...ANALYSIS_FLAGS });
  const jsonl = p.positional.filter(isJsonLinesPath);
  if (p.positional.length < 2 && jsonl.length === 0) throw new UsageError('compare needs at least two runs');
  const fromLines = jsonl.length ? runsFromRecords(await readJsonLines(nodeFileAccessor, jsonl)) : { runs: [], notes: [] };
  if (p.positional.length - jsonl.length + fromLines.runs.length < 2) throw new UsageError('compare needs at least two runs');
  const format = (flag(p, 'format') ?? 'table') as ComparisonFormat;
  if (!FORMATS.includes(format)) throw new UsageError(`--format must be one of ${FORMATS.join(', ')}, got "${format}"`);
  const reference = flag(p, 'reference');
  if (reference !== undefined && !p.positional.includes(reference) && !fromLines.runs.some((r) => r.name === reference)) {
    throw new UsageError(`--reference must be one of the runs given, got "${reference}"`);
  }
  const settings = analysisSettingsFromArgs(p);
  const zeroMode = energyZeroFromArgs(p);
  await ensureSymmetryReady();
  const runs: RunInput[] = [];
  const notes: string[] = [...fromLines.notes];
  for (const path of p.positional) {
    if (isJsonLinesPath(path)) {
      // All the JSON Lines runs, merged in path order, stand where the first such file was named.
      if (path === jsonl[0]) runs.push(...fromLines.runs);
      continue;
    }
    if (isAnnotationsPath(path)) {
      const a = await loadAnnotationsRun(nodeFileAccessor, path);
      runs.push(a.run);
      notes.push(...a.staleReasons.map((r) => `${path}: stale: ${r}`), ...a.notes.map((n) => `${path}: ${n}`));
      continue;
    }
    const bs = await loadRun(nodeFileAccessor, path, p.flags.has('soc') ? { spinorbit: true } : {});
    runs.push(dataRunInput(path, bs, analyzeBandStructure(bs, settings)));
  }
  const c = compareRuns(runs, reference);
  const zeros: Record<string, EnergyZero> = {};
  for (const r of runs) {
    const z = energyZeroOf(r.report, zeroMode, r.fermi_eV ?? null);
    zeros[r.name] = z;
    if (z.reason) notes.push(`${r.name}: energies shown raw: the ${zeroMode} zero cannot be used (${z.reason})`);
  }
  io.out(formatComparison(c, format, { zeros }));
  // Why a run is stale, or has no structure: on stderr, so csv/json output stays machine-readable.
  for (const n of notes) io.err(n);
  return 0;
}
