/**
 * Writer for CASTEP .bands from a model band structure: header in atomic units (Fermi energy in Hartree,
 * cell in Bohr), "K-point" blocks with fractional k and weight, "Spin component" blocks of eigenvalues in
 * Hartree, one per line (the layout as CASTEP writes it, common practice).
 */
import type { BandStructure } from '../../../src/core/model';
import { BOHR_ANGSTROM, HARTREE_EV } from '../../../src/core/units';
import { fortranF, fortranI } from './vasp';

export interface CastepOptions {
  /** Write the k-point blocks in this order of indices (CASTEP writes them as its processes finish). */
  order?: number[];
  fermiEnergy?: number;
}

export function writeCastepBands(bs: BandStructure, opts: CastepOptions = {}): string {
  const ns = bs.nSpin;
  const out: string[] = [];
  out.push(`Number of k-points${fortranI(bs.nk, 6)}`);
  out.push(`Number of spin components${fortranI(ns, 2)}`);
  const el = bs.electrons ?? 0;
  out.push(`Number of electrons ${ns === 2 ? `${fortranF(el / 2, 9, 3)}${fortranF(el / 2, 9, 3)}` : fortranF(el, 9, 3)}`);
  out.push(`Number of eigenvalues ${Array.from({ length: ns }, () => fortranI(bs.nBands, 6)).join('')}`);
  const ef = (opts.fermiEnergy ?? bs.fermiEnergy ?? 0) / HARTREE_EV;
  out.push(
    ns === 2
      ? `Fermi energies (in atomic units) ${fortranF(ef, 12, 6)}${fortranF(ef, 12, 6)}`
      : `Fermi energy (in atomic units) ${fortranF(ef, 12, 6)}`,
  );
  out.push('Unit cell vectors');
  for (const r of bs.lattice!) out.push(`${r.map((x) => fortranF(x / BOHR_ANGSTROM, 12, 6)).join('')}`);
  const order = opts.order ?? Array.from({ length: bs.nk }, (_, i) => i);
  for (const k of order) {
    const w = bs.weights ? bs.weights[k]! : 1 / bs.nk;
    out.push(
      `K-point${fortranI(k + 1, 5)}${[bs.kpoints[3 * k]!, bs.kpoints[3 * k + 1]!, bs.kpoints[3 * k + 2]!, w].map((x) => fortranF(x, 12, 8)).join('')}`,
    );
    for (let s = 0; s < ns; s++) {
      out.push(`Spin component ${s + 1}`);
      for (let b = 0; b < bs.nBands; b++) out.push(fortranF(bs.energies[s]![k * bs.nBands + b]! / HARTREE_EV, 14, 8));
    }
  }
  return out.join('\n') + '\n';
}
