/** `valleyscope analyze <file-or-folder> [--json] [--window meV] [--method name] [--range eV]` */
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun } from '../../core/load';
import { analyzeBandStructure, type AnalysisSettings } from '../../core/analysis/analyze';
import { summaryText } from '../../core/report/summaryText';
import { reportToJson } from '../../core/report/reportJson';
import { FIT_METHODS, methodId } from '../../core/analysis/methods';
import type { CliIO } from '../io';
import type { ReadOptions } from '../../core/formats/types';
import { readPoscar } from '../../core/formats/vasp/poscar';
import { detectQeXml, readQeXml } from '../../core/formats/qe/qeXml';

export const ANALYZE_HELP = `valleyscope analyze <file-or-folder> [options]
  Read an eigenvalue file (or find one in a run folder) and report the gap, band edges and effective masses.
  --json            print one JSON object
  --window <meV>    energy window of the curvature fit (default 25)
  --method <name>   ${FIT_METHODS.join(' | ')} (default parabola; fd3, fd5 still accepted)
  --range <eV>      report secondary extrema this close to the edges (default 0.5)
  --soc             treat the run as spin-orbit (one electron per band) when the files do not say
  --alat <Å>        lattice parameter alat, for layouts that give k in 2π/alat without a cell (bands.x output)
  --structure <file>  a POSCAR-like structure file (or a pw.x XML data file), for runs whose files give no
                    cell or atoms`;

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
  const alat = numberFlag(p, 'alat', (x) => x > 0 && x < 1000, 'a positive length in Å');
  if (alat !== undefined) o.alatAngstrom = alat;
  const sfile = flag(p, 'structure');
  if (sfile !== undefined) {
    let bytes: Uint8Array;
    try {
      bytes = await nodeFileAccessor.readFile(sfile);
    } catch (e) {
      throw new UsageError(`--structure: cannot read "${sfile}" (${(e as NodeJS.ErrnoException).code ?? 'unreadable'})`);
    }
    if (detectQeXml(bytes.subarray(0, 4096), sfile) > 0) {
      // A pw.x data file gives the structure and the alat its k-points are written in.
      const qe = readQeXml({ path: sfile, bytes });
      o.structure = qe.structure;
      if (o.alatAngstrom === undefined) o.alatAngstrom = qe.alat;
    } else o.structure = readPoscar({ path: sfile, bytes });
  }
  return o;
}

export async function runAnalyze(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { json: { value: false }, ...ANALYSIS_FLAGS, ...READ_FLAGS });
  if (p.positional.length !== 1) throw new UsageError('analyze takes exactly one file or folder');
  const settings = analysisSettingsFromArgs(p);
  const bs = await loadRun(nodeFileAccessor, p.positional[0]!, await readOptionsFromArgs(p));
  const report = analyzeBandStructure(bs, settings);
  if (p.flags.has('json')) io.out(JSON.stringify(reportToJson(report)));
  else io.out(summaryText(report));
  return 0;
}
