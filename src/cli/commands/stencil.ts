/** `valleyscope stencil <file-or-folder> --at cbm|vbm|<k> [--step Å⁻¹] [--out file]` */
import { promises as fsp } from 'node:fs';
import { flag, numberFlag, parseArgs, UsageError } from '../args';
import { nodeFileAccessor } from '../nodeFileAccessor';
import { loadRun } from '../../core/load';
import { analyzeBandStructure } from '../../core/analysis/analyze';
import { DEFAULT_STENCIL_STEP, kStencil, STENCIL_FILE_NAMES, stencilLayoutFor, writeStencil } from '../../core/lattice/stencil';
import { ValleyscopeError } from '../../core/errors';
import type { Vec3 } from '../../core/model';
import type { CliIO } from '../io';

export const STENCIL_HELP = `valleyscope stencil <file-or-folder> --at cbm|vbm|<k> [options]
  Write the k-points of a finite-difference stencil (19 points: the centre, ±step along x, y, z and the 12
  diagonal pairs) around the band edge or a fractional k such as 0.5,0,0.5, in the k-point input layout of
  the code the run came from. Run a non-self-consistent calculation at these points and analyse its output
  with "valleyscope analyze": the result carries the full mass tensor.
  VASP: an explicit KPOINTS list in reciprocal coordinates with zero weights, the layout of the band points
  of a hybrid-functional run (put them after the weighted points of IBZKPT and add their number to line 2);
  for a plain non-self-consistent run (ICHARG = 11) give them weight 1.
  Quantum ESPRESSO: a K_POINTS crystal card for an nscf or bands run. CASTEP: a SPECTRAL_KPOINT_LIST block.
  Other layouts: a plain list of fractional k.
  --at <where>      cbm, vbm, or a fractional k (three numbers, comma- or space-separated)
  --step <1/Å>      distance of the stencil points from the centre (default ${DEFAULT_STENCIL_STEP})
  --out <file>      write to this file (never overwrites) instead of printing
  --soc             treat the run as spin-orbit (one electron per band) when the files do not say`;

function parseK(text: string): Vec3 | null {
  const parts = text.trim().split(/[\s,]+/).filter(Boolean).map(Number);
  if (parts.length !== 3 || !parts.every(Number.isFinite)) return null;
  return parts as Vec3;
}

export async function runStencil(argv: string[], io: CliIO): Promise<number> {
  const p = parseArgs(argv, { at: { value: true }, step: { value: true }, out: { value: true }, soc: { value: false } });
  if (p.positional.length !== 1) throw new UsageError('stencil takes exactly one file or folder');
  const at = flag(p, 'at');
  if (at === undefined) throw new UsageError('--at is required: cbm, vbm or a fractional k such as 0.5,0,0.5');
  const step = numberFlag(p, 'step', (x) => x > 0 && x < 1, 'a positive number of 1/Å below 1') ?? DEFAULT_STENCIL_STEP;
  const bs = await loadRun(nodeFileAccessor, p.positional[0]!, p.flags.has('soc') ? { spinorbit: true } : {});
  if (!bs.lattice) throw new ValleyscopeError(`${bs.source.file}: no lattice is known for this run, so a stencil in 1/Å cannot be placed (put the structure file beside it)`);
  let center: Vec3;
  let what: string;
  const where = at.toLowerCase();
  if (where === 'cbm' || where === 'vbm') {
    const report = analyzeBandStructure(bs);
    if (!report.gap) throw new ValleyscopeError(`${bs.source.file}: no gap was found (${report.metal ? 'a metal' : 'band edges unknown'}), so there is no ${where.toUpperCase()} to centre the stencil on`);
    const pt = where === 'cbm' ? report.gap.cbm : report.gap.vbm;
    center = pt.k;
    what = `the ${where.toUpperCase()} (band ${pt.band}${pt.label ? ` at ${pt.label}` : ''}, k = ${pt.k.join(' ')})`;
  } else {
    const k = parseK(at);
    if (!k) throw new UsageError(`--at must be cbm, vbm or three numbers (fractional k), got "${at}"`);
    center = k;
    what = `k = ${k.join(' ')}`;
  }
  const layout = stencilLayoutFor(bs.source.format);
  const text = writeStencil(kStencil(center, step, bs.lattice), layout, what);
  const out = flag(p, 'out');
  if (out === undefined) {
    io.out(text);
    return 0;
  }
  try {
    await fsp.writeFile(out, text, { flag: 'wx' });
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') throw new ValleyscopeError(`${out} already exists; the stencil never overwrites a file (choose another name, e.g. ${STENCIL_FILE_NAMES[layout]}.stencil)`);
    throw e;
  }
  io.err(`wrote ${out}: ${layout === 'list' ? 'fractional k-points' : `${layout} k-point input`} for ${what}`);
  return 0;
}
