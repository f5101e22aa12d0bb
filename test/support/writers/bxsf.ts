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
}

export function writeBxsf(c: BxsfContent): string {
  const out: string[] = [];
  out.push('  BEGIN_INFO', '       #', '       # this is a Band-XCRYSDEN-Structure-File', '       # for Fermi Surface Visualisation', '       #');
  out.push(`       Fermi Energy:   ${c.fermiEnergy.toFixed(14)}`);
  out.push('  END_INFO', '', '  BEGIN_BLOCK_BANDGRID_3D', ' from_wannier_code', '  BEGIN_BANDGRID_3D_fermi');
  out.push(`           ${c.bands.length}`);
  out.push(c.dims.map((d) => String(d).padStart(12)).join(''));
  out.push(` ${(c.origin ?? [0, 0, 0]).map((x) => x.toFixed(1)).join(' ')}`);
  for (const r of c.reciprocal) out.push(r.map((x) => x.toFixed(15).padStart(24)).join(''));
  c.bands.forEach((band, b) => {
    out.push(` BAND:            ${b + 1}`);
    for (let i = 0; i < band.length; i += 6) {
      const row: string[] = [];
      for (let j = i; j < Math.min(band.length, i + 6); j++) row.push(fortranE(band[j]!, 16, 8));
      out.push(row.join(''));
    }
  });
  out.push(' END_BANDGRID_3D', '  END_BLOCK_BANDGRID_3D');
  return out.join('\n') + '\n';
}
