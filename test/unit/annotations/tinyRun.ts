/**
 * A tiny VASP-layout band run written by the tests: a simple cubic cell (a = 4 Å) with nearest-neighbour
 * cosine tight-binding bands along Γ–X (the one-band tight-binding model, E = E0 ∓ 2t cos(ka), a published
 * analytic model; physics.md "Analytic models with exact masses"):
 *   band 1 (valence)     E_v(k) = 2 t_v (cos ka − 1),           maximum 0 at Γ
 *   band 2 (conduction)  E_c(k) = E_g + 2 t_c (1 − cos ka),     minimum E_g at Γ
 *   band 3               E_3(k) = E_g + 6 + 2 t_c (1 − cos ka)
 * with 2 electrons, so the gap is E_g, direct at Γ, and the masses at Γ are m* = ħ²/(2 t a²).
 * The layouts (EIGENVAL with the occupation column, POSCAR, KPOINTS in line mode) are VASP's own.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export const TINY = {
  a: 4,
  gap_eV: 1.5,
  tValence_eV: 1.0,
  tConduction_eV: 2.0,
  nk: 21,
  nBands: 3,
  electrons: 2,
};

export interface TinyRunOptions {
  /** Add this to one eigenvalue: [k index, band index (1-based), shift in eV]. */
  shift?: [number, number, number];
  /** Text of the system line (line 5): changes the bytes, not the numbers. */
  system?: string;
  /** Band gap E_g, eV (default TINY.gap_eV). */
  gap_eV?: number;
}

export function tinyEnergies(options: TinyRunOptions = {}): number[][] {
  const eg = options.gap_eV ?? TINY.gap_eV;
  const out: number[][] = [];
  for (let i = 0; i < TINY.nk; i++) {
    const kx = (0.5 * i) / (TINY.nk - 1);
    const c = Math.cos(2 * Math.PI * kx); // k·a with k = 2π kx / a
    const e = [2 * TINY.tValence_eV * (c - 1), eg + 2 * TINY.tConduction_eV * (1 - c), eg + 6 + 2 * TINY.tConduction_eV * (1 - c)];
    if (options.shift && options.shift[0] === i) e[options.shift[1] - 1]! += options.shift[2];
    out.push(e);
  }
  return out;
}

const f = (x: number, w: number, d: number): string => x.toFixed(d).padStart(w);

export function eigenvalText(options: TinyRunOptions = {}): string {
  const lines = [
    '    1    1   21    1',
    '  0.6400000E+02  0.4000000E-09  0.4000000E-09  0.4000000E-09  0.5000000E-15',
    '  1.0000000000000E-004',
    '  CAR',
    ` ${options.system ?? 'tiny cubic tight-binding model'}`,
    `      ${TINY.electrons}     ${TINY.nk}      ${TINY.nBands}`,
  ];
  const energies = tinyEnergies(options);
  for (let i = 0; i < TINY.nk; i++) {
    const kx = (0.5 * i) / (TINY.nk - 1);
    lines.push('', `  ${f(kx, 12, 7)}  ${f(0, 12, 7)}  ${f(0, 12, 7)}  ${f(1 / TINY.nk, 12, 7)}`);
    energies[i]!.forEach((e, b) => lines.push(`    ${b + 1}   ${f(e, 12, 6)}   ${f(b === 0 ? 1 : 0, 8, 6)}`));
  }
  return lines.join('\n') + '\n';
}

export const POSCAR_TEXT = `tiny cubic model
1.0
  4.0 0.0 0.0
  0.0 4.0 0.0
  0.0 0.0 4.0
H
1
Direct
  0.0 0.0 0.0
`;

export const KPOINTS_TEXT = `k-path for the tiny cubic model
21
Line-mode
reciprocal
  0.0 0.0 0.0 ! G
  0.5 0.0 0.0 ! X
`;

/** Write EIGENVAL, POSCAR and KPOINTS into `dir`; returns the EIGENVAL path. */
export function writeTinyRun(dir: string, options: TinyRunOptions = {}): string {
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'POSCAR'), POSCAR_TEXT);
  writeFileSync(join(dir, 'KPOINTS'), KPOINTS_TEXT);
  const eig = join(dir, 'EIGENVAL');
  writeFileSync(eig, eigenvalText(options));
  return eig;
}
