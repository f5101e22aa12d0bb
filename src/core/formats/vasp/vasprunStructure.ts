/**
 * The structures a vasprun.xml lists (<structure name="initialpos"|"finalpos"|...>: lattice rows in Å and
 * fractional positions) and the one a band structure uses: the final one when written, else the last
 * complete one; none when its lattice vectors are linearly dependent.
 */
import type { Mat3, Structure, Vec3 } from '../../model';
import { det3 } from '../../lattice/linalg';

export interface StructureDraft {
  name: string;
  basis: Vec3[];
  positions: number[];
}

/** The structure to use, with the species of <atominfo> (placeholders when their count differs). */
export function chosenStructure(drafts: readonly StructureDraft[], species: readonly string[]): Structure | null {
  const pick = drafts.find((s) => s.name === 'finalpos') ?? drafts[drafts.length - 1] ?? null;
  if (!pick) return null;
  const lattice = pick.basis as Mat3;
  const nAtoms = pick.positions.length / 3;
  if (!(Math.abs(det3(lattice)) > 1e-8)) return null;
  const names = species.length === nAtoms ? species.slice() : Array.from({ length: nAtoms }, (_, i) => species[i] ?? `X${i + 1}`);
  return { lattice, species: names, positions: Float64Array.from(pick.positions) };
}
