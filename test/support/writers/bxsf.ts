/**
 * Writer for BXSF band grids as Wannier90 writes them (list-directed header, 'BAND:' records, six values per
 * line in E13.5... here E16.8 for precision), from band energies on a periodic general grid.
 */
import type { Mat3, Vec3 } from '../../../src/core/model';
import { fortranE } from './vasp';

export interface BxsfContent {
  fermiEnergy: number;
  dims: Vec3;
  /** Reciprocal vectors, rows, Å⁻¹ with the 2π. */
  reciprocal: Mat3;
  /** bands[b][index], index = (i*n2 + j)*n3 + l, end points included. */
  bands: Float64Array[];
  origin?: Vec3;
  /**
   * Header style: 'wannier90' (BEGIN_BANDGRID_3D_fermi, the default) or 'fs.x' (Quantum ESPRESSO's fs.x:
   * a BANDGRID_3D_BANDS header without the BEGIN_ prefix).
   */
  style?: 'wannier90' | 'fs.x';
  /** How the reciprocal vectors are written: Å⁻¹ with the 2π (default), Å⁻¹ without it, or units of 2π/alat. */
  units?: 'angstrom-2pi' | 'angstrom' | 'two-pi-over-alat';
  /** alat (Å), for units 'two-pi-over-alat'. */
  alat?: number;
  /** Number written on the first BAND: line (fs.x writes the run's band numbers, e.g. 3). */
  firstBand?: number;
}

export function writeBxsf(c: BxsfContent): string {
  const out: string[] = [];
  out.push(
    '  BEGIN_INFO',
    '       #',
    '       # this is a Band-XCRYSDEN-Structure-File',
    '       # for Fermi Surface Visualisation',
    '       #',
  );
  out.push(`       Fermi Energy:   ${c.fermiEnergy.toFixed(14)}`);
  out.push(
    '  END_INFO',
    '',
    '  BEGIN_BLOCK_BANDGRID_3D',
    c.style === 'fs.x' ? ' band_energies' : ' from_wannier_code',
    c.style === 'fs.x' ? ' BANDGRID_3D_BANDS' : '  BEGIN_BANDGRID_3D_fermi',
  );
  out.push(`           ${c.bands.length}`);
  out.push(c.dims.map((d) => String(d).padStart(12)).join(''));
  out.push(` ${(c.origin ?? [0, 0, 0]).map((x) => x.toFixed(1)).join(' ')}`);
  const scale = c.units === 'angstrom' ? 1 / (2 * Math.PI) : c.units === 'two-pi-over-alat' ? c.alat! / (2 * Math.PI) : 1;
  for (const r of c.reciprocal) out.push(r.map((x) => (x * scale).toFixed(15).padStart(24)).join(''));
  c.bands.forEach((band, b) => {
    out.push(` BAND:            ${b + (c.firstBand ?? 1)}`);
    for (let i = 0; i < band.length; i += 6) {
      const row: string[] = [];
      for (let j = i; j < Math.min(band.length, i + 6); j++) row.push(fortranE(band[j]!, 16, 8));
      out.push(row.join(''));
    }
  });
  out.push(' END_BANDGRID_3D', '  END_BLOCK_BANDGRID_3D');
  return out.join('\n') + '\n';
}
