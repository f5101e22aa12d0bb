/**
 * A finite-difference stencil of k-points around an extremum, for a follow-up non-self-consistent run whose
 * output gives the full mass tensor (tensorFit.ts): the centre, ±h along the three cartesian axes and
 * h(±e_i ± e_j) for each pair of axes — the 19 points of the standard second-derivative stencil in three
 * dimensions (common practice). Written in the k-point input layout of the code the run came from.
 */
import type { Mat3, Vec3 } from '../model';
import { cartesianToFractional } from './reciprocal';

export interface KStencil {
  /** Fractional reciprocal coordinates, centre first. */
  points: Vec3[];
  center: Vec3;
  /** Step, Å⁻¹. */
  step: number;
}

/** Default step, Å⁻¹: at m* = 1 it changes the energy by about 1.5 meV, at m* = 0.1 by about 15 meV. */
export const DEFAULT_STENCIL_STEP = 0.02;

export function kStencil(center: Vec3, step: number, lattice: Mat3): KStencil {
  if (!(step > 0) || !Number.isFinite(step)) throw new RangeError(`the stencil step must be a positive number of Å⁻¹, got ${step}`);
  const offsets: Vec3[] = [[0, 0, 0]];
  for (let i = 0; i < 3; i++) {
    for (const s of [1, -1]) {
      const d: Vec3 = [0, 0, 0];
      d[i] = s * step;
      offsets.push(d);
    }
  }
  for (let i = 0; i < 3; i++) {
    for (let j = i + 1; j < 3; j++) {
      for (const si of [1, -1]) {
        for (const sj of [1, -1]) {
          const d: Vec3 = [0, 0, 0];
          d[i] = si * step;
          d[j] = sj * step;
          offsets.push(d);
        }
      }
    }
  }
  const points = offsets.map((d) => {
    const f = cartesianToFractional(d, lattice);
    return [center[0] + f[0], center[1] + f[1], center[2] + f[2]] as Vec3;
  });
  return { points, center, step };
}

/** The k-point input layouts a stencil can be written in. */
export type StencilLayout = 'vasp' | 'qe' | 'castep' | 'list';

/** The layout matching the format a band structure was read from. */
export function stencilLayoutFor(format: string): StencilLayout {
  if (format.startsWith('vasp')) return 'vasp';
  if (format.startsWith('qe')) return 'qe';
  if (format.startsWith('castep')) return 'castep';
  return 'list';
}

export const STENCIL_FILE_NAMES: Record<StencilLayout, string> = {
  vasp: 'KPOINTS',
  qe: 'k_points.in',
  castep: 'spectral_kpoints.cell',
  list: 'stencil_kpoints.txt',
};

const num = (x: number): string => (Object.is(x, -0) || Math.abs(x) < 5e-13 ? 0 : x).toFixed(10).padStart(15);

/** The stencil as text in the given layout; `what` describes the centre (e.g. "the CBM at Γ"). */
export function writeStencil(st: KStencil, layout: StencilLayout, what: string): string {
  const n = st.points.length;
  const pts = st.points;
  const about = `${n}-point k stencil around ${what}, step ${st.step} 1/Angstrom (Valleyscope)`;
  switch (layout) {
    case 'vasp':
      // Explicit list, fractional ("Reciprocal") coordinates, zero weights: the layout of the band points
      // of a hybrid-functional run, appended after the weighted self-consistent mesh.
      return [about, String(n), 'Reciprocal', ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}  0`), ''].join('\n');
    case 'qe':
      // pw.x card for a non-self-consistent (nscf or bands) run, crystal coordinates.
      return [`! ${about}`, 'K_POINTS crystal', String(n), ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}  1.0`), ''].join('\n');
    case 'castep':
      // Block for the .cell file of a spectral task.
      return [`! ${about}`, '%BLOCK SPECTRAL_KPOINT_LIST', ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}  ${(1 / n).toFixed(10)}`), '%ENDBLOCK SPECTRAL_KPOINT_LIST', ''].join('\n');
    case 'list':
      return [`# ${about}`, '# fractional reciprocal coordinates k1 k2 k3', ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}`), ''].join('\n');
  }
}
