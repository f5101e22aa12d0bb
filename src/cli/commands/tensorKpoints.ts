/** `valleyscope tensor-kpoints <file-or-folder> --at cbm|vbm|<k> [options]` */
import { promises as fsp } from 'node:fs';
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun } from '../../core/load';
import { analyzeBandStructure } from '../../core/analysis/analyze';
import { DEFAULT_SHELL_ENERGY_EV, planAtK, planForExtremum } from '../../core/analysis/tensorRunPlan';
import {
  KPOINT_FILE_NAMES,
  kpointLayoutFor,
  writeTensorKpoints,
  type TensorRunKind,
  type TensorRunPlan,
  type WeightedMesh,
} from '../../core/lattice/tensorKpoints';
import { ValleyscopeError } from '../../core/errors';
import type { MethodFamily, BandStructure, ExtremumReport, Vec3 } from '../../core/model';
import type { CliIO } from '../io';

export const TENSOR_KPOINTS_HELP = `valleyscope tensor-kpoints <file-or-folder> --at cbm|vbm|<k> [options]
  Plan a tensor run: the k-points of a follow-up calculation around a band edge (or a fractional k such as
  0.5,0,0.5) whose energies give the full mass tensor, or at a degenerate edge every branch and the
  warped-band fit. Points lie on two shells (h and 2h) along the axes, face diagonals and, at a degenerate
  edge, body diagonals; only points the little group of k does not relate are written (the analysis expands
  them back, so keep the structure file beside the run). Centred on the extremum refined between the path's
  points; h is chosen so the lightest mass measured there moves --energy at h. Analyse the run's output with
  "valleyscope analyze".
  --at <where>      cbm, vbm, or a fractional k (three numbers, comma- or space-separated)
  --step <1/Å>      shell distance h (default: from the mass measured on the path and --energy)
  --energy <meV>    energy the band moves at h (default ${DEFAULT_SHELL_ENERGY_EV * 1000})
  --for nscf|hybrid nscf: weight 1 (a non-self-consistent run); hybrid: the self-consistent mesh with its
                    weights, then these points with weight 0 (VASP). Default: hybrid when the run read was a
                    hybrid-functional run (as its files say, or weighted points followed by zero-weight ones),
                    else nscf. Quantum ESPRESSO and CASTEP inputs are for nscf/spectral runs.
  --mesh <file>     for --for hybrid: the weighted k-points (IBZKPT layout) to put first (default: the run's own
                    weighted points when it is a mesh run)
  --out <file>      write to this file (never overwrites) instead of printing
  --soc             treat the run as spin-orbit (one electron per band) when the files do not say`;

function parseK(text: string): Vec3 | null {
  const parts = text
    .trim()
    .split(/[\s,]+/)
    .filter(Boolean)
    .map(Number);
  if (parts.length !== 3 || !parts.every(Number.isFinite)) return null;
  return parts as Vec3;
}

/** The weighted points of an IBZKPT-style explicit list (reciprocal coordinates). Hostile input: checked. */
export function parseWeightedList(text: string, file: string): WeightedMesh {
  const lines = text.split(/\r?\n/);
  const n = Number((lines[1] ?? '').trim().split(/\s+/)[0]);
  if (!Number.isInteger(n) || n <= 0 || n > 1_000_000)
    throw new ValleyscopeError(`${file}, line 2: expected the number of k-points, found "${(lines[1] ?? '').trim()}"`);
  if (!/^\s*[rR]/.test(lines[2] ?? ''))
    throw new ValleyscopeError(
      `${file}, line 3: only an explicit list in reciprocal coordinates can be used as the mesh ("Reciprocal lattice")`,
    );
  const k: Vec3[] = [];
  const w: number[] = [];
  for (let i = 0; i < n; i++) {
    const f = (lines[3 + i] ?? '').trim().split(/\s+/).slice(0, 4).map(Number);
    if (f.length < 4 || !f.every(Number.isFinite) || f[3]! < 0)
      throw new ValleyscopeError(`${file}, line ${4 + i}: expected k1 k2 k3 weight, found "${(lines[3 + i] ?? '').trim()}"`);
    k.push([f[0]!, f[1]!, f[2]!]);
    w.push(f[3]!);
  }
  return { k, w };
}

/**
 * True when the run was laid out as a hybrid-functional band run: weighted points followed by zero-weight ones
 * (or the reader dropped such a mesh and said so).
 */
function zeroWeightAppended(bs: BandStructure): boolean {
  if (bs.warnings.some((w) => w.code === 'mesh-points-dropped')) return true;
  if (!bs.weights) return false;
  let pos = false;
  let zero = false;
  for (let i = 0; i < bs.nk; i++) {
    if (bs.weights[i]! > 0) pos = true;
    else if (bs.weights[i] === 0) zero = true;
  }
  return pos && zero;
}

/** The run's own weighted mesh (a self-consistent run, or the mesh part of a hybrid band run), or null. */
function ownMesh(bs: BandStructure): WeightedMesh | null {
  if (!bs.weights || (bs.sampling === 'path' && !zeroWeightAppended(bs))) return null;
  // (A VASP reader drops the mesh of a hybrid band run: then there is none to reuse, and --mesh gives it.)
  const k: Vec3[] = [];
  const w: number[] = [];
  for (let i = 0; i < bs.nk; i++) {
    if (bs.weights[i]! > 0) {
      k.push([bs.kpoints[3 * i]!, bs.kpoints[3 * i + 1]!, bs.kpoints[3 * i + 2]!]);
      w.push(bs.weights[i]!);
    }
  }
  return k.length ? { k, w } : null;
}

/** The run's functional family when the files name it ('unknown' counts as not named). */
function methodFamily(bs: BandStructure): MethodFamily | null {
  const f = bs.method?.family;
  return f && f !== 'unknown' ? f : null;
}

export async function runTensorKpoints(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, {
    at: { value: true },
    step: { value: true },
    energy: { value: true },
    for: { value: true },
    mesh: { value: true },
    out: { value: true },
    soc: { value: false },
  });
  if (p.positional.length !== 1) throw new UsageError('tensor-kpoints takes exactly one file or folder');
  const at = flag(p, 'at');
  if (at === undefined) throw new UsageError('--at is required: cbm, vbm or a fractional k such as 0.5,0,0.5');
  const step = numberFlag(p, 'step', (x) => x >= 0.001 && x < 1, 'a number of 1/Å from 0.001 to below 1');
  const energyMeV = numberFlag(p, 'energy', (x) => x > 0 && x <= 200, 'a positive number of meV up to 200');
  const forText = flag(p, 'for');
  if (forText !== undefined && forText !== 'nscf' && forText !== 'hybrid')
    throw new UsageError(`--for must be nscf or hybrid, got "${forText}"`);
  const bs = await loadRun(nodeFileAccessor, p.positional[0]!, p.flags.has('soc') ? { spinorbit: true } : {});
  if (!bs.lattice)
    throw new ValleyscopeError(
      `${bs.source.file}: no lattice is known for this run, so points in 1/Å cannot be placed (put the structure file beside it)`,
    );
  const family = methodFamily(bs);
  const kind: TensorRunKind = forText ?? (family === 'hybrid' || (family === null && zeroWeightAppended(bs)) ? 'hybrid' : 'nscf');
  const report = analyzeBandStructure(bs);
  let plan: TensorRunPlan;
  let what: string;
  const notes: string[] = [];
  const where = at.toLowerCase();
  let edge: ExtremumReport | undefined;
  if (where === 'cbm' || where === 'vbm') {
    edge = report.extrema.find((e) => e.kind === where);
    // A run of one neighbourhood (a tensor run) gives no gap but still its centre's extremum.
    if (!report.gap && !edge)
      throw new ValleyscopeError(
        `${bs.source.file}: no gap was found (${report.metal ? 'a metal' : (report.gapReason ?? 'band edges unknown')}), so there is no ${where.toUpperCase()} to centre the run on`,
      );
    if (!edge)
      throw new ValleyscopeError(
        `${bs.source.file}: the ${where.toUpperCase()} was not characterised, so the run cannot be planned around it`,
      );
  } else {
    const k = parseK(at);
    if (!k) throw new UsageError(`--at must be cbm, vbm or three numbers (fractional k), got "${at}"`);
    edge = report.extrema.find((e) => e.k.every((x, i) => Math.abs(x - k[i]!) < 1e-6));
    if (!edge) {
      if (step === undefined)
        throw new UsageError(`no extremum was found at ${k.join(',')}, so the step cannot be chosen from its mass: give --step`);
      plan = planAtK(bs, k, step, false);
      what = `k = ${k.join(' ')}`;
      notes.push(`h = ${step} Å⁻¹ as given`);
    }
  }
  if (edge) {
    try {
      const planned = planForExtremum(bs, edge, {
        ...(step !== undefined ? { step } : {}),
        ...(energyMeV !== undefined ? { energy_eV: energyMeV / 1000 } : {}),
      });
      plan = planned.plan;
      notes.push(`centre: ${planned.centre.how}`, planned.stepHow);
    } catch (e) {
      if (e instanceof RangeError) throw new ValleyscopeError(`${bs.source.file}: ${e.message}`);
      throw e;
    }
    const kText = plan.center.map((x) => Number(x.toFixed(6))).join(' ');
    what = `${edge.kind.toUpperCase()} band ${edge.band}${edge.degenerateBands > 1 ? ` (${edge.degenerateBands} degenerate bands)` : ''}${edge.label ? ` near ${edge.label}` : ''}, k = ${kText}`;
  }
  const layout = kpointLayoutFor(bs.source.format);
  let mesh: WeightedMesh | null = null;
  if (kind === 'hybrid') {
    const meshFile = flag(p, 'mesh');
    if (meshFile !== undefined) mesh = parseWeightedList(await fsp.readFile(meshFile, 'utf8'), meshFile);
    else mesh = ownMesh(bs);
    if (layout !== 'vasp')
      notes.push(
        `--for hybrid: the zero-weight list appended to the mesh is VASP's layout; the ${layout} input is written for a non-self-consistent or spectral run`,
      );
    else if (!mesh)
      notes.push(
        '--for hybrid: no weighted mesh was found (give --mesh IBZKPT): only the zero-weight points are written; put them after the weighted points of the self-consistent mesh and add their number to line 2',
      );
  }
  if (!plan!.operations)
    notes.push('no crystal symmetry is known: every point is written (put the structure file beside the run for the reduced list)');
  const text = writeTensorKpoints(plan!, layout, what!, kind, mesh);
  const out = flag(p, 'out');
  const summary = `${plan!.points.length} k-points (${plan!.allPoints.length} with their symmetry images) for ${what!}; ${notes.join('; ')}`;
  if (out === undefined) {
    io.out(text);
    io.err(summary);
    return 0;
  }
  try {
    await fsp.writeFile(out, text, { flag: 'wx' });
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST')
      throw new ValleyscopeError(
        `${out} already exists; tensor-kpoints never overwrites a file (choose another name, e.g. ${KPOINT_FILE_NAMES[layout]}.tensor)`,
      );
    throw e;
  }
  io.err(`wrote ${out}: ${summary}`);
  return 0;
}
