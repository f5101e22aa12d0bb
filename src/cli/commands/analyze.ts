/** `valleyscope analyze <file-or-folder> [--json] [--window meV] [--method name] [--range eV]` */
import { alatFlag, flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun } from '../../core/load';
import { analyzeBandStructure, type AnalysisSettings } from '../../core/analysis/analyze';
import { summaryText } from '../../core/report/summaryText';
import { analysisJson } from '../analysisJson';
import { FIT_METHODS, methodId } from '../../core/analysis/methods';
import type { CliIO } from '../io';
import type { ReadOptions } from '../../core/formats/types';
import { readStructureFile } from '../../core/formats/structureFile';
import { READ_LIMITS } from '../../core/io/readLimits';
import { ENERGY_ZEROS, energyZeroOf, isEnergyZeroMode, type EnergyZeroMode } from '../../core/report/energyZero';
import { labelledLines, pathPosition } from '../../core/lattice/pathPosition';
import { BATCH_FLAGS, BATCH_HELP, batchOptionsFromArgs } from '../batch/batchOptions';
import { analyzeBatch } from '../batch/commands';

export const ANALYZE_HELP = `valleyscope analyze <file-or-folder> [options]
valleyscope analyze <files or folders>... --jsonl [--jobs N] [--shard i/n] [options]
  Read an eigenvalue file (or find one in a run folder) and report the gap, band edges and effective masses.
  With --jsonl, every run found under the paths (folders are searched for run folders) is analysed.
  --json            print one JSON object
${BATCH_HELP}
  --window <meV>    energy window of the curvature fit (default 25)
  --method <name>   ${FIT_METHODS.join(' | ')} (default parabola; fd3, fd5 still accepted)
  --range <eV>      report secondary extrema this close to the edges (default 0.5)
  --soc             treat the run as spin-orbit (one electron per band) when the files do not say
  --alat <length+unit>  lattice parameter alat with its unit, e.g. 10.20bohr or 5.40A, for layouts that give
                    k in 2π/alat without a cell (bands.x output); a bare number is refused. alat alone gives
                    distances and masses, not the lattice: labels then need --structure
  --structure <file>  a POSCAR-like structure file (or a pw.x XML data file, which also gives the electron
                    count and spinor state), for runs whose files give no cell or atoms
  --scf-set         a VASP 6 vasprun.xml with a KPOINTS_OPT set: analyse the self-consistent set instead
  --energy-zero <vbm|cbm|midgap|fermi|raw>
                    the zero of the energies printed (default vbm); --json keeps the raw energies and
                    says which zero the text would use`;

/** --energy-zero, checked (default vbm). */
export function energyZeroFromArgs(p: ReturnType<typeof parseArgs>): EnergyZeroMode {
  const z = flag(p, 'energy-zero') ?? 'vbm';
  if (!isEnergyZeroMode(z)) throw new UsageError(`--energy-zero must be one of ${ENERGY_ZEROS.join(', ')}, got "${z}"`);
  return z;
}

export function analysisSettingsFromArgs(p: ReturnType<typeof parseArgs>): Partial<AnalysisSettings> {
  const s: Partial<AnalysisSettings> = {};
  const w = numberFlag(p, 'window', (x) => x > 0 && x <= 5000, 'a positive number of meV');
  if (w !== undefined) s.window_meV = w;
  const r = numberFlag(p, 'range', (x) => x >= 0 && x <= 20, 'a number of eV between 0 and 20');
  if (r !== undefined) s.range_eV = r;
  const m = flag(p, 'method');
  if (m !== undefined) {
    const id = methodId(m);
    if (id === null) throw new UsageError(`--method must be one of ${FIT_METHODS.join(', ')}, got "${m}"`);
    s.method = id;
  }
  return s;
}

export const ANALYSIS_FLAGS = {
  window: { value: true },
  method: { value: true },
  range: { value: true },
  soc: { value: false },
} as const;

/** Flags that tell a reader what the run's files leave out. */
export const READ_FLAGS = {
  alat: { value: true },
  structure: { value: true },
} as const;

/** ReadOptions from --soc, --alat and --structure (the structure file is read here, as a POSCAR). */
export async function readOptionsFromArgs(p: ReturnType<typeof parseArgs>): Promise<ReadOptions> {
  const o: ReadOptions = {};
  if (p.flags.has('soc')) o.spinorbit = true;
  if (p.flags.has('scf-set')) o.scfSet = true;
  const alat = alatFlag(p);
  if (alat !== undefined) o.alatAngstrom = alat;
  const sfile = flag(p, 'structure');
  if (sfile !== undefined) {
    let bytes: Uint8Array;
    try {
      // Anywhere the user points, but a regular file within the structure-file limit (SECURITY.md).
      bytes = await nodeFileAccessor.readFile(sfile, READ_LIMITS.structure);
    } catch (e) {
      throw new UsageError(`--structure: ${e instanceof Error ? e.message : String(e)}`);
    }
    // A pw.x data file gives the structure, the alat its k-points are written in, the electron count and
    // whether the run used spinors; a POSCAR-like file the structure only.
    const st = readStructureFile({ path: sfile, bytes });
    o.structure = st.structure;
    if (o.alatAngstrom === undefined && st.alat_angstrom !== null) o.alatAngstrom = st.alat_angstrom;
    if (st.electrons !== null) o.electrons = st.electrons;
    if (o.spinorbit === undefined && st.spinors) o.spinorbit = true;
  }
  return o;
}

export async function runAnalyze(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, {
    json: { value: false },
    'energy-zero': { value: true },
    'scf-set': { value: false },
    ...ANALYSIS_FLAGS,
    ...READ_FLAGS,
    ...BATCH_FLAGS,
  });
  const batch = batchOptionsFromArgs(p);
  if (batch.requested) {
    if (!batch.jsonl) throw new UsageError('--jobs and --shard go with --jsonl (one line per run)');
    if (p.flags.has('json')) throw new UsageError('--json and --jsonl cannot be used together');
    if (p.positional.length === 0) throw new UsageError('analyze --jsonl needs at least one file or folder');
    return analyzeBatch(p.positional, analysisSettingsFromArgs(p), await readOptionsFromArgs(p), batch, io, energyZeroFromArgs(p));
  }
  if (p.positional.length !== 1) throw new UsageError('analyze takes exactly one file or folder (several with --jsonl)');
  const settings = analysisSettingsFromArgs(p);
  const mode = energyZeroFromArgs(p);
  // Neither output prints the file's SHA-256 (annotations record it: `annotate`): not computed.
  const bs = await loadRun(nodeFileAccessor, p.positional[0]!, { ...(await readOptionsFromArgs(p)), hashSources: false });
  const report = analyzeBandStructure(bs, settings);
  // --json: raw energies as the code wrote them; the zero and the path positions beside them.
  if (p.flags.has('json')) {
    io.out(JSON.stringify(analysisJson(bs, report, mode)));
    return 0;
  }
  // The path's labelled lines (a pass over every k-point) only for the text, which analysisJson does not share.
  const lines = labelledLines(bs);
  const positionOf = (k: readonly number[]): string | null => pathPosition(k, lines);
  io.out(summaryText(report, { zero: energyZeroOf(report, mode, bs.fermiEnergy), positionOf }));
  return 0;
}
