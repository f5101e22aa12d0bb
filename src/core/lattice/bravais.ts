/**
 * The Bravais lattice of a crystal (from its structure) or of a bare lattice (from a one-atom cell on it),
 * with the conventional cell parameters, as found by the crystal-symmetry library.
 */
import type { Mat3, Structure } from '../model';
import { norm } from './linalg';
import { analyzeStructure, DEFAULT_SYMPREC, latticeFromMoyo } from './symmetry';
import { moyoSpaceGroupType } from './moyoRuntime';
import { cubicBravais } from './cubicPointSymmetry';

export interface BravaisLattice {
  /** International Tables Bravais class: 'aP', 'mP', 'mC', 'oP', 'oS', 'oI', 'oF', 'tP', 'tI', 'hR', 'hP', 'cP', 'cI', 'cF'. */
  bravaisClass: string;
  /** Space group of the structure, or of the one-atom cell (the lattice's holohedry) when only the lattice is known. */
  spaceGroup: number;
  /** Conventional (standardised) cell rows, Å, in the library's orientation. */
  conventional: Mat3;
  /** Lengths of the conventional cell vectors, Å. */
  lengths: [number, number, number];
  /** True when found from the structure (atoms included), false when from the lattice alone. */
  fromStructure: boolean;
}

/** One atom at the origin: a cell whose symmetry is the lattice's own (its holohedry). */
export function latticeOnlyStructure(lattice: Mat3): Structure {
  // One per lattice object, so its symmetry is computed once (analyzeStructure keeps datasets per structure).
  let cell = latticeCells.get(lattice);
  if (!cell) latticeCells.set(lattice, (cell = { lattice, species: ['X'], positions: new Float64Array([0, 0, 0]) }));
  return cell;
}
const latticeCells = new WeakMap<Mat3, Structure>();

/**
 * Bravais lattice from the structure when given (its symmetry may be lower than the lattice's), else from the
 * lattice alone. Needs ensureSymmetryReady() first; throws AnalysisError on failure.
 */
export function bravaisLattice(lattice: Mat3, structure: Structure | null, symprec: number = DEFAULT_SYMPREC): BravaisLattice {
  const cell = structure ?? latticeOnlyStructure(lattice);
  // A cubic crystal in a primitive cell: class and edge from its operations (cubicPointSymmetry.ts) without the
  // library's search; the space group and the library's conventional cell only when read.
  const cubic = cubicBravais(cell, symprec);
  if (cubic) {
    const full = (): BravaisLattice => libraryBravais(cell, structure !== null, symprec);
    return Object.defineProperties(
      { bravaisClass: cubic.bravaisClass, lengths: [cubic.a, cubic.a, cubic.a], fromStructure: structure !== null },
      {
        spaceGroup: { get: () => full().spaceGroup, enumerable: true },
        conventional: { get: () => full().conventional, enumerable: true },
      },
    ) as BravaisLattice;
  }
  return libraryBravais(cell, structure !== null, symprec);
}

function libraryBravais(cell: Structure, fromStructure: boolean, symprec: number): BravaisLattice {
  const d = analyzeStructure(cell, symprec);
  const conventional = latticeFromMoyo(d.std_cell.lattice.basis);
  return {
    bravaisClass: moyoSpaceGroupType(d.number).bravais_class,
    spaceGroup: d.number,
    conventional,
    lengths: [norm(conventional[0]), norm(conventional[1]), norm(conventional[2])],
    fromStructure,
  };
}
