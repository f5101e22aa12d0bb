import { fortranI } from './writers/vasp';

/**
 * The six header lines of a small VASP 5 EIGENVAL (one ion, one spin channel, system "toy"; the layout of the
 * code's own files, common practice), each line ended; the blank line and the k-point blocks follow.
 */
export function eigenvalHeader(electrons: number, nk: number, nBands: number): string {
  return `       1       1       1       1
  0.1000000E+02  0.2000000E-09  0.2000000E-09  0.2000000E-09  0.5000000E-15
  1.000000000000000E-004
  CAR
 toy
${fortranI(electrons, 7)}${fortranI(nk, 7)}${fortranI(nBands, 7)}
`;
}
