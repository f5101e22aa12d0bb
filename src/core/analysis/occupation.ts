/**
 * Which states are occupied. Occupations decide when the file gives them; otherwise the electron count
 * fills the lowest states at every k (2 electrons per band without spin-orbit or spin polarisation, 1 with
 * either); otherwise the Fermi energy. (physics.md, step 2: common practice.)
 */
import type { BandStructure } from '../model';
import { markFilled } from './bandFilling';

export interface OccupationRule {
  /** How occupation was decided: 'occupations', 'electrons', 'fermi'. */
  basis: 'occupations' | 'electrons' | 'fermi';
  /** Electrons one band of one spin channel holds: 2 for spin-degenerate collinear runs, else 1. */
  perBand: 1 | 2;
  /** True when the electron count does not fill a whole number of bands (odd count without spin: a metal). */
  fractionalFilling: boolean;
  /** isOccupied[spin][k*nBands+band] */
  occupied: Uint8Array[];
  warnings: string[];
}

export function occupationRule(bs: BandStructure): OccupationRule | null {
  const perBand: 1 | 2 = bs.nSpin === 1 && !bs.spinorbit ? 2 : 1;
  const { nk, nBands, nSpin } = bs;
  const occupied = Array.from({ length: nSpin }, () => new Uint8Array(nk * nBands));
  const warnings: string[] = [];
  // Occupations that follow from a Fermi energy fixed on other k-points carry nothing the electron count does not.
  const ownOccupations = !(bs.fermiFromOtherKPoints && bs.electrons !== null && bs.electrons > 0);
  if (bs.occupations && ownOccupations) {
    // Files write either fractions (0..1) or electrons (0..2): half of the largest value is the threshold.
    if (markFilled(bs.occupations, nBands, occupied).any) {
      if (bs.electrons !== null && bs.nk > 0) {
        let count = 0;
        for (let s = 0; s < nSpin; s++) for (let b = 0; b < nBands; b++) count += occupied[s]![b]!;
        if (Math.abs(count * perBand - bs.electrons) > 0.5 && nSpin === 1) {
          warnings.push(
            `Occupations fill ${count} bands at the first k-point, but ${bs.electrons} electrons fill ${bs.electrons / perBand}: occupations were used.`,
          );
        }
      }
      return { basis: 'occupations', perBand, fractionalFilling: false, occupied, warnings };
    }
    warnings.push(
      'Every occupation in the file is zero (a non-self-consistent run may write them so): the electron count was used instead.',
    );
  }
  if (bs.electrons !== null && bs.electrons > 0) {
    const slots = bs.electrons / perBand;
    const filled = Math.floor(slots + 1e-6);
    const fractionalFilling = Math.abs(slots - Math.round(slots)) > 1e-6;
    if (filled > nBands * nSpin) {
      warnings.push(`${bs.electrons} electrons need more bands than the file has (${nBands}): edges cannot be placed.`);
      return null;
    }
    if (nSpin === 1) {
      for (let k = 0; k < nk; k++) for (let b = 0; b < filled; b++) occupied[0]![k * nBands + b] = 1;
    } else {
      // Two spin channels share one set of electrons: fill the lowest states of both at each k.
      const e0 = bs.energies[0]!;
      const e1 = bs.energies[1]!;
      for (let k = 0; k < nk; k++) {
        let i = 0;
        let j = 0;
        for (let n = 0; n < filled; n++) {
          const a = i < nBands ? e0[k * nBands + i]! : Infinity;
          const c = j < nBands ? e1[k * nBands + j]! : Infinity;
          if (a <= c) occupied[0]![k * nBands + i++] = 1;
          else occupied[1]![k * nBands + j++] = 1;
        }
      }
    }
    return { basis: 'electrons', perBand, fractionalFilling, occupied, warnings };
  }
  if (bs.fermiEnergy !== null) {
    for (let s = 0; s < nSpin; s++) {
      const e = bs.energies[s]!;
      for (let i = 0; i < e.length; i++) if (e[i]! <= bs.fermiEnergy) occupied[s]![i] = 1;
    }
    return { basis: 'fermi', perBand, fractionalFilling: false, occupied, warnings };
  }
  return null;
}
