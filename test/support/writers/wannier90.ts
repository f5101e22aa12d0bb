/**
 * Writers for Wannier90's band-plot files from a model band structure: seedname_band.dat ('(2E16.8)',
 * distance and energy, bands separated by a blank record), seedname_band.kpt (count, then '(3f12.6,3x,f4.1)'),
 * seedname_band.labelinfo.dat ('(a,3x,I10,3x,4F18.10)') and a seedname.win with unit_cell_cart.
 */
import type { BandStructure } from '../../../src/core/model';
import { BOHR_ANGSTROM } from '../../../src/core/units';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { fortranE, fortranF, fortranI } from './vasp';

export interface Wannier90Files {
  bandDat: string;
  kpt: string;
  labelinfo: string;
  win: string;
}

export function writeWannier90(bs: BandStructure, opts: { fermiEnergy?: number; bohr?: boolean; spinors?: boolean } = {}): Wannier90Files {
  const geo = pathGeometry(bs);
  const x = geo.distance;
  const dat: string[] = [];
  for (let b = 0; b < bs.nBands; b++) {
    for (let k = 0; k < bs.nk; k++) dat.push(`${fortranE(x[k]!, 16, 8)}${fortranE(bs.energies[0]![k * bs.nBands + b]!, 16, 8)}`);
    dat.push('  ');
  }
  const kpt = [fortranI(bs.nk, 12)];
  for (let k = 0; k < bs.nk; k++)
    kpt.push(
      `${[bs.kpoints[3 * k]!, bs.kpoints[3 * k + 1]!, bs.kpoints[3 * k + 2]!].map((v) => fortranF(v, 12, 6)).join('')}   ${fortranF(1, 4, 1)}`,
    );
  const li: string[] = [];
  for (const l of bs.labels) {
    const name = l.label === 'Γ' ? 'G' : l.label;
    li.push(
      `${name.padEnd(2)}   ${fortranI(l.index + 1, 10)}   ${[x[l.index]!, bs.kpoints[3 * l.index]!, bs.kpoints[3 * l.index + 1]!, bs.kpoints[3 * l.index + 2]!].map((v) => fortranF(v, 18, 10)).join('')}`,
    );
  }
  const win: string[] = ['num_wann = ' + bs.nBands, 'num_bands = ' + bs.nBands, ''];
  if (opts.fermiEnergy !== undefined) win.push(`fermi_energy = ${opts.fermiEnergy}`);
  if (opts.spinors) win.push('spinors = .true.');
  win.push('bands_plot = true', '', 'Begin Unit_Cell_Cart', opts.bohr ? 'bohr' : 'ang');
  for (const r of bs.lattice!) win.push(r.map((v) => (opts.bohr ? v / BOHR_ANGSTROM : v).toFixed(8).padStart(14)).join(''));
  win.push('End Unit_Cell_Cart', '');
  if (bs.structure) {
    win.push('begin atoms_frac');
    bs.structure.species.forEach((s, i) =>
      win.push(`${s} ${[0, 1, 2].map((j) => bs.structure!.positions[3 * i + j]!.toFixed(8)).join(' ')}`),
    );
    win.push('end atoms_frac', '');
  }
  win.push('mp_grid = 4 4 4');
  return { bandDat: dat.join('\n') + '\n', kpt: kpt.join('\n') + '\n', labelinfo: li.join('\n') + '\n', win: win.join('\n') + '\n' };
}
