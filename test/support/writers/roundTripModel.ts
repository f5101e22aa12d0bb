/**
 * The model band structure every layout writer is fed in the round-trip tests: an orthorhombic cell
 * (a, b, c = 4, 5, 6 Å) with nearest-neighbour cosine bands, so the gap and masses are known in closed form
 * (analytic model): a deep band, a valence band with its maximum 0 eV at Γ and a conduction band with its
 * minimum 1.2 eV at X = (½, 0, 0). Gap 1.2 eV, indirect Γ → X. Spin-polarised and spin-orbit variants.
 */
import type { BandStructure, Vec3 } from '../../../src/core/model';
import { cosineBand, orthorhombicLattice, pathModel, type Dispersion } from '../models';

export const MODEL_GAP_EV = 1.2;
/** Exchange splitting of the spin-polarised variant: spin down valence −0.1 eV, conduction +0.1 eV. */
export const MODEL_SPLIT_EV = 0.1;
export const MODEL_LATTICE = orthorhombicLattice(4, 5, 6);
/** Conduction band hopping along x (eV): its mass at X along x is −ħ²/(2 t a²) in magnitude ħ²/(2·0.6·16). */
export const MODEL_TC: Vec3 = [0.6, 0.5, 0.4];
export const MODEL_TV: Vec3 = [-0.5, -0.4, -0.3];

/** Conduction band with its minimum at X: E = Ec + 2t_x(1 + cos 2πk_x) + Σ_{y,z} 2t(1 − cos 2πk). */
function conductionAtX(ec: number, t: Vec3): Dispersion {
  return (_kc, kf) =>
    ec +
    2 * t[0] * (1 + Math.cos(2 * Math.PI * kf[0])) +
    2 * t[1] * (1 - Math.cos(2 * Math.PI * kf[1])) +
    2 * t[2] * (1 - Math.cos(2 * Math.PI * kf[2]));
}

const G = { label: 'Γ', k: [0, 0, 0] as Vec3 };
const X = { label: 'X', k: [0.5, 0, 0] as Vec3 };
const S = { label: 'S', k: [0.5, 0.5, 0] as Vec3 };
const Y = { label: 'Y', k: [0, 0.5, 0] as Vec3 };
const Z = { label: 'Z', k: [0, 0, 0.5] as Vec3 };

function base(shiftV = 0, shiftC = 0): BandStructure {
  return pathModel({
    lattice: MODEL_LATTICE,
    bands: [cosineBand(-4 + shiftV, [-0.1, -0.1, -0.1]), cosineBand(0 + shiftV, MODEL_TV), conductionAtX(MODEL_GAP_EV + shiftC, MODEL_TC)],
    electrons: 4,
    legs: [[G, X, S, Y, G, Z]],
    pointsPerSegment: 21,
  });
}

/** Occupations of the lowest `filled` bands (per channel), `full` each. */
function occupations(bs: BandStructure, filled: number, full: number): Float64Array {
  const o = new Float64Array(bs.nk * bs.nBands);
  for (let k = 0; k < bs.nk; k++) for (let b = 0; b < filled; b++) o[k * bs.nBands + b] = full;
  return o;
}

/** Spin-degenerate collinear run: 4 electrons fill two bands (common practice). */
export function collinearModel(): BandStructure {
  const bs = base();
  bs.fermiEnergy = 0.6;
  bs.occupations = [occupations(bs, 2, 1)];
  bs.structure = { lattice: MODEL_LATTICE, species: ['Xx'], positions: new Float64Array([0, 0, 0]) };
  return bs;
}

/** Spin-polarised: spin down shifted apart by MODEL_SPLIT_EV; 4 electrons, 2 per channel. */
export function spinPolarisedModel(): BandStructure {
  const up = collinearModel();
  const down = base(-MODEL_SPLIT_EV, MODEL_SPLIT_EV);
  up.nSpin = 2;
  up.energies = [up.energies[0]!, down.energies[0]!];
  up.occupations = [occupations(up, 2, 1), occupations(up, 2, 1)];
  return up;
}

/** Spin-orbit (non-collinear): every band doubled as a Kramers pair, one electron per band, 4 electrons. */
export function spinOrbitModel(): BandStructure {
  const c = collinearModel();
  const nb = 2 * c.nBands;
  const e = new Float64Array(c.nk * nb);
  for (let k = 0; k < c.nk; k++)
    for (let b = 0; b < c.nBands; b++) {
      e[k * nb + 2 * b] = c.energies[0]![k * c.nBands + b]!;
      e[k * nb + 2 * b + 1] = c.energies[0]![k * c.nBands + b]!;
    }
  c.nBands = nb;
  c.energies = [e];
  c.spinorbit = true;
  c.occupations = [occupations(c, 4, 1)];
  return c;
}
