/**
 * Two questions a BXSF band grid leaves open, answered from its numbers: whether the grid repeats its first
 * plane at the end of each axis (a periodic general grid), and in which unit its reciprocal vectors are written.
 */
import type { Mat3, Vec3 } from '../model';
import type { ReadOptions } from './types';
import { mat3Inverse, transpose3 } from '../lattice/linalg';

/** True when, along every axis, the last plane of the grid repeats the first (within the written digits). */
export function endpointsRepeat(bandMajor: Float64Array, bands: number, dims: Vec3): boolean {
  const [n1, n2, n3] = dims;
  const nk = n1 * n2 * n3;
  const at = (b: number, i: number, j: number, l: number): number => bandMajor[b * nk + (i * n2 + j) * n3 + l]!;
  // Repeated points are the same k: equal to the written digits, or to a little numerical noise.
  const same = (x: number, y: number): boolean => Math.abs(x - y) <= 2e-4 * Math.max(1, Math.abs(x));
  for (let b = 0; b < bands; b++) {
    for (let j = 0; j < n2; j++) for (let l = 0; l < n3; l++) if (!same(at(b, 0, j, l), at(b, n1 - 1, j, l))) return false;
    for (let i = 0; i < n1; i++) for (let l = 0; l < n3; l++) if (!same(at(b, i, 0, l), at(b, i, n2 - 1, l))) return false;
    for (let i = 0; i < n1; i++) for (let j = 0; j < n2; j++) if (!same(at(b, i, j, 0), at(b, i, j, n3 - 1))) return false;
  }
  return true;
}

/**
 * The unit of the written reciprocal vectors: Å⁻¹ including 2π (Wannier90), Å⁻¹ without 2π, or units of
 * 2π/alat (Quantum ESPRESSO's fs.x). With a known lattice the one that reproduces its reciprocal vectors is
 * taken; without one, the header style decides, and the note says what was assumed.
 */
export function reciprocalUnits(rec: Mat3, bareHeader: boolean, options: ReadOptions): { scale: number; note: string | null } {
  const known = options.structure?.lattice ?? options.lattice ?? null;
  const alat = options.alatAngstrom ?? (known ? Math.hypot(...known[0]) : null);
  const hyps: { scale: number; name: string }[] = [
    { scale: 1, name: 'Å⁻¹ including 2π' },
    { scale: 2 * Math.PI, name: 'Å⁻¹ without the 2π' },
  ];
  if (alat) hyps.push({ scale: (2 * Math.PI) / alat, name: `units of 2π/alat (alat = ${alat.toFixed(5)} Å)` });
  if (known) {
    const ref = transpose3(mat3Inverse(known)).map((r) => r.map((x) => 2 * Math.PI * x)) as Mat3;
    const refScale = Math.max(...ref.map((r) => Math.hypot(...r)));
    const misfit = (scale: number): number =>
      Math.max(...rec.map((r, i) => Math.hypot(...r.map((x, j) => scale * x - ref[i]![j]!)))) / refScale;
    const best = hyps.map((h) => ({ ...h, err: misfit(h.scale) })).sort((a, b) => a.err - b.err)[0]!;
    if (best.err < 1e-3)
      return { scale: best.scale, note: `Reciprocal vectors read in ${best.name}: the only unit that matches the structure given.` };
    return {
      scale: 1,
      note: `The reciprocal vectors match the structure given in none of the units tried (${hyps.map((h) => h.name).join('; ')}): read as Å⁻¹ including 2π. Check that the structure belongs to this grid.`,
    };
  }
  if (bareHeader) {
    if (alat)
      return {
        scale: (2 * Math.PI) / alat,
        note: `Reciprocal vectors assumed in units of 2π/alat (alat = ${alat.toFixed(5)} Å), as Quantum ESPRESSO's fs.x writes this header; give --structure to check.`,
      };
    return {
      scale: 1,
      note: "This header style is Quantum ESPRESSO fs.x's, which writes reciprocal vectors in units of 2π/alat; without --alat or --structure they were read as Å⁻¹ including 2π, so k distances and masses may be off by the factor alat/2π.",
    };
  }
  return { scale: 1, note: null };
}
