/**
 * Writers for VASP's text layouts (EIGENVAL, POSCAR/CONTCAR, KPOINTS), used by the fixture generator and by
 * tests. They write what VASP writes: fixed Fortran fields (`4I5`, `5E15.7`, `3I7`, `4E15.7`, band lines
 * `(1X,I4,4X,F12.6[,2X,F12.6][,2X,F9.6 ...])`), a blank record written as one space, and `*` fields when a
 * number overflows its width (the layouts as seen in VASP 5.4/6 output files, common practice).
 */
import { MODEL_SYSTEM_PREFIX } from '../../../src/core/formats/vasp/vaspMethod';
import type { Mat3, Vec3 } from '../../../src/core/model';

// ---------------------------------------------------------------------------------------------------------
// Fortran-style number fields

/** Fortran `Fw.d`: right-aligned fixed point; a field of `*` when the number does not fit. */
export function fortranF(x: number, width: number, decimals: number): string {
  const s = x.toFixed(decimals);
  return s.length > width ? '*'.repeat(width) : s.padStart(width);
}

/** Fortran `Ew.d` (e.g. E15.7 → `  0.1234567E+00`): mantissa in [0.1, 1), two-digit exponent. */
export function fortranE(x: number, width: number, digits: number): string {
  let mantissa: string;
  let exponent: number;
  if (x === 0) {
    mantissa = '0'.repeat(digits);
    exponent = 0;
  } else {
    const [m, e] = Math.abs(x)
      .toExponential(digits - 1)
      .split('e') as [string, string];
    mantissa = m.replace('.', '');
    exponent = Number(e) + 1;
  }
  const exp = `${exponent < 0 ? '-' : '+'}${String(Math.abs(exponent)).padStart(2, '0')}`;
  const s = `${x < 0 ? '-' : ''}0.${mantissa}E${exp}`;
  return s.length > width ? '*'.repeat(width) : s.padStart(width);
}

/** Fortran `Iw`. */
export function fortranI(n: number, width: number): string {
  const s = String(Math.trunc(n));
  return s.length > width ? '*'.repeat(width) : s.padStart(width);
}

// ---------------------------------------------------------------------------------------------------------
// EIGENVAL

/**
 * The SYSTEM name of a file written from a model Hamiltonian: "model: <description>". The VASP readers take
 * this prefix as family 'model' (a Valleyscope convention, documented in DEVELOPERS.md).
 */
export function modelSystemName(description: string): string {
  return `${MODEL_SYSTEM_PREFIX} ${description}`;
}

export interface EigenvalContent {
  /** System name (line 5). */
  system: string;
  nIons: number;
  electrons: number;
  nBands: number;
  /** nk × 3 fractional reciprocal coordinates. */
  kpoints: Float64Array;
  /** nk weights; defaults to 1/nk each (VASP's line mode writes equal weights). */
  weights?: Float64Array;
  /** One array per spin channel (1 or 2), layout [k * nBands + band], eV. */
  energies: Float64Array[];
  /** Same layout as energies; omitted or null for the older layout without the occupation column. */
  occupations?: Float64Array[] | null;
  /** Lattice rows in Å, for line 2 (volume per atom, lengths in m); unit cube when omitted. */
  lattice?: Mat3;
}

export function writeEigenval(c: EigenvalContent): string {
  const nSpin = c.energies.length;
  if (nSpin !== 1 && nSpin !== 2) throw new Error('writeEigenval: one or two spin channels');
  const nk = c.kpoints.length / 3;
  for (const e of c.energies) if (e.length !== nk * c.nBands) throw new Error('writeEigenval: energies do not match nk × nBands');
  if (c.occupations && c.occupations.length !== nSpin) throw new Error('writeEigenval: occupations need one array per spin');
  const lattice = c.lattice ?? [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  const volume = Math.abs(
    lattice[0][0] * (lattice[1][1] * lattice[2][2] - lattice[1][2] * lattice[2][1]) -
      lattice[0][1] * (lattice[1][0] * lattice[2][2] - lattice[1][2] * lattice[2][0]) +
      lattice[0][2] * (lattice[1][0] * lattice[2][1] - lattice[1][1] * lattice[2][0]),
  );
  const len = (r: Vec3): number => Math.hypot(r[0], r[1], r[2]) * 1e-10;
  const out: string[] = [];
  out.push([c.nIons, c.nIons, 1, nSpin].map((n) => fortranI(n, 5)).join(''));
  out.push([volume / c.nIons, len(lattice[0]), len(lattice[1]), len(lattice[2]), 0.5e-15].map((x) => fortranE(x, 15, 7)).join(''));
  out.push('  1.000000000000000E-004');
  out.push('  CAR ');
  out.push(` ${c.system.padEnd(40)}`);
  out.push([Math.round(c.electrons), nk, c.nBands].map((n) => fortranI(n, 7)).join(''));
  for (let k = 0; k < nk; k++) {
    out.push(' ');
    const w = c.weights ? c.weights[k]! : 1 / nk;
    out.push([c.kpoints[3 * k]!, c.kpoints[3 * k + 1]!, c.kpoints[3 * k + 2]!, w].map((x) => fortranE(x, 15, 7)).join(''));
    for (let b = 0; b < c.nBands; b++) {
      const i = k * c.nBands + b;
      let line = ` ${fortranI(b + 1, 4)}    ${fortranF(c.energies[0]![i]!, 12, 6)}`;
      if (nSpin === 2) line += `  ${fortranF(c.energies[1]![i]!, 12, 6)}`;
      if (c.occupations) for (let s = 0; s < nSpin; s++) line += `  ${fortranF(c.occupations[s]![i]!, 9, 6)}`;
      out.push(line);
    }
  }
  return out.join('\n') + '\n';
}

/** Occupations of an insulator at zero temperature: 1 for the lowest `filled` bands, 0 above. */
export function insulatorOccupations(nk: number, nBands: number, filled: number): Float64Array {
  const occ = new Float64Array(nk * nBands);
  for (let k = 0; k < nk; k++) for (let b = 0; b < Math.min(filled, nBands); b++) occ[k * nBands + b] = 1;
  return occ;
}

// ---------------------------------------------------------------------------------------------------------
// POSCAR / CONTCAR

export interface PoscarContent {
  comment: string;
  /** Lattice rows in Å (written with scale 1 unless `scale` is given; rows are then divided by it). */
  lattice: Mat3;
  /** Species names, one per group, and the number of atoms in each group. */
  species: string[];
  counts: number[];
  /** Fractional positions, grouped by species in the order of `species`. */
  positions: Vec3[];
  /** Universal scaling factor written on line 2 (default 1). */
  scale?: number;
  /** 'vasp5' (default): species line before the counts; 'vasp4': no species line. */
  layout?: 'vasp5' | 'vasp4';
}

export function writePoscar(p: PoscarContent): string {
  const scale = p.scale ?? 1;
  const total = p.counts.reduce((a, b) => a + b, 0);
  if (p.positions.length !== total) throw new Error(`writePoscar: ${total} atoms counted, ${p.positions.length} positions`);
  if (p.species.length !== p.counts.length) throw new Error('writePoscar: one count per species');
  const out: string[] = [];
  out.push(p.comment);
  out.push(`   ${scale.toFixed(14)}     `);
  for (const r of p.lattice) out.push(' ' + r.map((x) => fortranF(x / scale, 22, 16)).join(''));
  if ((p.layout ?? 'vasp5') === 'vasp5') out.push(p.species.map((s) => `   ${s}`).join(''));
  out.push(p.counts.map((n) => fortranI(n, 6)).join(''));
  out.push('Direct');
  for (const pos of p.positions) out.push(pos.map((x) => fortranF(x, 20, 16)).join(''));
  return out.join('\n') + '\n';
}

// ---------------------------------------------------------------------------------------------------------
// KPOINTS

export interface LineModeKpoints {
  comment: string;
  pointsPerSegment: number;
  /** Segment ends in fractional reciprocal coordinates with their labels (Γ may be given as 'Γ'). */
  segments: [{ k: Vec3; label: string }, { k: Vec3; label: string }][];
  /** How Γ is spelled after `!` (default `\Gamma`). */
  gammaSpelling?: '\\Gamma' | 'GAMMA' | 'G' | 'Γ';
}

export function writeLineModeKpoints(c: LineModeKpoints): string {
  const gamma = c.gammaSpelling ?? '\\Gamma';
  const end = (e: { k: Vec3; label: string }): string =>
    `${e.k.map((x) => x.toFixed(10).padStart(15)).join('')}   ! ${e.label === 'Γ' ? gamma : e.label}`;
  const out: string[] = [c.comment, String(c.pointsPerSegment).padStart(5), 'Line-mode', 'Reciprocal'];
  c.segments.forEach(([a, b], i) => {
    if (i > 0) out.push('');
    out.push(end(a), end(b));
  });
  return out.join('\n') + '\n';
}

/** KPOINTS with an explicit list of k-points (fractional) and integer-like weights. */
export function writeExplicitKpoints(comment: string, kpoints: Float64Array, weights?: Float64Array): string {
  const nk = kpoints.length / 3;
  const out: string[] = [comment, String(nk).padStart(5), 'Reciprocal'];
  for (let k = 0; k < nk; k++) {
    const w = weights ? weights[k]! : 1;
    out.push(
      `${[kpoints[3 * k]!, kpoints[3 * k + 1]!, kpoints[3 * k + 2]!].map((x) => x.toFixed(10).padStart(15)).join('')}${w.toFixed(6).padStart(12)}`,
    );
  }
  return out.join('\n') + '\n';
}
