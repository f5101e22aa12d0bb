/**
 * A run read from its data files, as the comparison takes it: its report, its crystal (rotations, Bravais
 * class, lattice points per cell, composition: from the symmetry of the structure when the files give one)
 * and the labelled lines of its path (to name valleys "0.85 Γ→X", as the CLI does).
 */
import type { BandStructure, Mat3, Report, Structure } from '../model';
import { crystalSymmetry, symmetryReady } from '../lattice/symmetry';
import { labelledLines } from '../lattice/pathPosition';
import { compositionOf } from './structureDescriptors';
import type { RunInput } from './compareRuns';

/** What the comparison needs of a crystal; nulls where the structure is unknown or its symmetry not found. */
export interface RunCrystal {
  rotations: Mat3[] | null;
  latticeType: string | null;
  latticePointsPerCell: number | null;
  composition: string | null;
}

/** The crystal of a structure (symmetry only once the symmetry library is ready; callers wait for it first). */
export function runCrystal(structure: Structure | null | undefined): RunCrystal {
  const composition = structure ? compositionOf(structure.species) : null;
  const none = { rotations: null, latticeType: null, latticePointsPerCell: null, composition };
  if (!structure || !symmetryReady()) return none;
  try {
    const sym = crystalSymmetry(structure);
    return { rotations: sym.rotations, latticeType: sym.bravaisClass, latticePointsPerCell: sym.latticePointsPerCell, composition };
  } catch {
    // A structure the symmetry search refuses: compared without symmetry (valleys under time reversal only).
    return none;
  }
}

/** A data run as the comparison's input: named `name`, analysed as `report`. */
export function dataRunInput(name: string, bs: BandStructure, report: Report): RunInput {
  return {
    name,
    report,
    lattice: bs.lattice,
    ...runCrystal(bs.structure),
    pathLines: labelledLines(bs),
    fermi_eV: bs.fermiEnergy,
    origin: 'data',
  };
}
