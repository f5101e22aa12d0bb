/**
 * The BandStructure of a band file that holds one spin channel along a path, without weights or occupations
 * (bands.x output, Wannier90's seedname_band.dat): the fields both fill alike, in one place.
 */
import type { BandSource, BandStructure } from '../model';

/** What such a file gives: counts, the energies [k * nBands + band] and whether it was cut short. */
export interface PathBandData {
  nk: number;
  nBands: number;
  energies: Float64Array;
  partial: boolean;
}

/** What the reader found beside the energies. */
export type PathBandFindings = Pick<
  BandStructure,
  'lattice' | 'structure' | 'kpoints' | 'fermiEnergy' | 'electrons' | 'spinorbit' | 'labels' | 'writtenDistance' | 'warnings'
> &
  Partial<Pick<BandStructure, 'method' | 'fermiSource'>>;

export function pathBandStructure(source: BandSource, data: PathBandData, found: PathBandFindings): BandStructure {
  const { nk, nBands, energies, partial } = data;
  return {
    source,
    ...found,
    nk,
    nBands,
    nSpin: 1,
    weights: null,
    energies: [energies],
    occupations: null,
    sampling: 'path',
    grid: null,
    partial,
  };
}
