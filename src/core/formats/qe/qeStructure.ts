/**
 * The crystal structure of a pw.x data file: an <atomic_structure> (alat and the cell in Bohr, atoms in
 * Bohr or in crystal coordinates) checked and converted once: lattice rows in Å, fractional positions.
 */
import type { Mat3, Structure, Vec3 } from '../../model';
import type { ReaderError } from '../../errors';
import { bohrToAngstrom } from '../../units';
import { det3, mat3Inverse, mulVecMat } from '../../lattice/linalg';

export interface AtomicStructureDraft {
  alat: number | null;
  species: string[];
  positions: number[];
  /** 'cartesian' (atomic_positions, Bohr) or 'crystal' (crystal_positions, fractional). */
  kind: 'cartesian' | 'crystal' | null;
  cell: (Vec3 | null)[];
  line: number;
}

/** The structure, the cell in Bohr and alat in Bohr; `fail(line, reason)` words what is missing. */
export function qeStructure(
  st: AtomicStructureDraft,
  fail: (line: number, reason: string) => ReaderError,
): { cellBohr: Mat3; alatBohr: number; structure: Structure } {
  if (st.alat === null || !(st.alat > 0)) throw fail(st.line, 'the <atomic_structure> gives no positive alat attribute');
  if (st.cell.some((v) => v === null)) throw fail(st.line, 'the <cell> lacks one of the vectors a1, a2, a3');
  const cellBohr = st.cell as Mat3;
  if (Math.abs(det3(cellBohr)) < 1e-10) throw fail(st.line, 'the lattice vectors a1, a2, a3 are linearly dependent (zero cell volume)');
  const lattice = cellBohr.map((r) => r.map(bohrToAngstrom)) as Mat3;
  const nAtoms = st.species.length;
  const positions = new Float64Array(3 * nAtoms);
  const inv = mat3Inverse(cellBohr);
  for (let a = 0; a < nAtoms; a++) {
    const p: Vec3 = [st.positions[3 * a]!, st.positions[3 * a + 1]!, st.positions[3 * a + 2]!];
    positions.set(st.kind === 'crystal' ? p : mulVecMat(p, inv), 3 * a);
  }
  return { cellBohr, alatBohr: st.alat, structure: { lattice, species: st.species, positions } };
}
