/**
 * Model metals, semimetals and smeared semiconductors for the classification tests, with occupations
 * computed here from published smearing functions:
 *  - free-electron metal in the empty simple-cubic lattice (Ashcroft & Mermin, Solid State Physics, ch. 2 and
 *    9): E_n(k) = ħ²|k + G_n|²/2m, Fermi wave vector k_F = (3π² n)^(1/3) (A&M eq. 2.21);
 *  - Fermi–Dirac f = 1/(1 + e^x); Gaussian f = ½ erfc(x); Methfessel–Paxton of order 1
 *    f = ½ erfc(x) − x e^(−x²)/(2√π) (Methfessel & Paxton, Phys. Rev. B 40, 3616 (1989), eqs. 9-10 with
 *    A_1 = −1/(4√π), H_1(x) = 2x), x = (E − E_F)/σ;
 *  - a two-band semimetal (cosine bands, hole pocket at Γ, electron pocket at X), a half-metal, and the
 *    round-trip semiconductor with smearing tails.
 * erf comes from mathjs (a general-purpose reference library).
 */
import { erf } from 'mathjs';
import type { BandStructure, Vec3 } from '../../src/core/model';
import { HBAR2_OVER_ME_EV_A2 } from '../../src/core/units';
import { cosineBand, cubicLattice, pathModel, type Dispersion, type PathLeg } from './models';
import { collinearModel } from './writers/roundTripModel';

export type Smearing = 'fermi-dirac' | 'gaussian' | 'methfessel-paxton';

/** Occupation (fraction of a full state) of a level at E for a Fermi level ef and width sigma. */
export function smearedOccupation(kind: Smearing, e: number, ef: number, sigma: number): number {
  const x = (e - ef) / sigma;
  if (kind === 'fermi-dirac') return x > 700 ? 0 : 1 / (1 + Math.exp(x));
  const gauss = 0.5 * (1 - (erf(x) as number));
  if (kind === 'gaussian') return gauss;
  return gauss - (x * Math.exp(-x * x)) / (2 * Math.sqrt(Math.PI));
}

/** Occupations of every state of `bs` (fractions, one array per channel) for the given smearing. */
export function smearedOccupations(bs: BandStructure, kind: Smearing, ef: number, sigma: number): Float64Array[] {
  return bs.energies.map((e) => Float64Array.from(e, (x) => smearedOccupation(kind, x, ef, sigma)));
}

/** Lattice constant of the free-electron model, Å. */
export const FE_A = 4;
/** One electron per cell (a monovalent metal), no spin polarisation. */
export const FE_ELECTRONS = 1;

/** k_F = (3π² n)^(1/3), n = Z / a³ (Ashcroft & Mermin eq. 2.21), Å⁻¹. */
export function freeElectronKF(electrons: number, a: number): number {
  return Math.cbrt((3 * Math.PI * Math.PI * electrons) / a ** 3);
}

/** E_F = ħ²k_F²/2m, eV (Ashcroft & Mermin eq. 2.24), energies measured from the band bottom. */
export function freeElectronFermi(electrons: number, a: number): number {
  return (HBAR2_OVER_ME_EV_A2 / 2) * freeElectronKF(electrons, a) ** 2;
}

/** Empty-lattice band of reciprocal vector G (integers n, in units of 2π/a): ħ²|k + G|²/2m. */
function emptyLatticeBand(n: Vec3, a: number): Dispersion {
  const g = (2 * Math.PI) / a;
  return (kc) => (HBAR2_OVER_ME_EV_A2 / 2) * ((kc[0] + n[0] * g) ** 2 + (kc[1] + n[1] * g) ** 2 + (kc[2] + n[2] * g) ** 2);
}

const G = { label: 'Γ', k: [0, 0, 0] as Vec3 };
const X = { label: 'X', k: [0.5, 0, 0] as Vec3 };
const M = { label: 'M', k: [0.5, 0.5, 0] as Vec3 };
const R = { label: 'R', k: [0.5, 0.5, 0.5] as Vec3 };
const CUBIC_PATH: PathLeg[][] = [[G, X, M, G, R]];

/**
 * The free-electron metal on the simple-cubic path Γ–X–M–Γ–R: the lowest empty-lattice bands (G = 0 and
 * the six shortest G), `electrons` per cell, spin-degenerate; the Fermi energy of the free-electron gas.
 */
export function freeElectronMetal(electrons = FE_ELECTRONS, a = FE_A): BandStructure {
  const gs: Vec3[] = [
    [0, 0, 0],
    [1, 0, 0],
    [-1, 0, 0],
    [0, 1, 0],
    [0, -1, 0],
    [0, 0, 1],
    [0, 0, -1],
  ];
  const bs = pathModel({
    lattice: cubicLattice(a),
    bands: gs.map((n) => emptyLatticeBand(n, a)),
    electrons,
    legs: CUBIC_PATH,
    pointsPerSegment: 21,
  });
  bs.structure = { lattice: cubicLattice(a), species: ['Na'], positions: new Float64Array([0, 0, 0]) };
  bs.fermiEnergy = freeElectronFermi(electrons, a);
  return bs;
}

/** The free-electron metal with occupations from one smearing function, width sigma (eV). */
export function smearedFreeElectronMetal(kind: Smearing, sigma = 0.1): BandStructure {
  const bs = freeElectronMetal();
  bs.occupations = smearedOccupations(bs, kind, bs.fermiEnergy!, sigma);
  return bs;
}

/** Overlap of the semimetal's two bands, eV: the hole band's top (Γ) minus the electron band's bottom (X). */
export const SEMIMETAL_OVERLAP_EV = 0.2;

/**
 * A two-band semimetal on the simple-cubic path (cosine bands, analytic): band 1 has its maximum +0.1 eV at
 * Γ (hole pocket), band 2 its minimum −0.1 eV at X (electron pocket); 2 electrons fill one band; E_F = 0.
 * Band 1: 0.1 − Σ 2·0.3 (1 − cos 2πk_i); band 2: −0.1 + 2·0.4 (1 + cos 2πk_x) + Σ_{y,z} 2·0.4 (1 − cos 2πk).
 * Along every leg of the path band 2 − band 1 ≥ 1.0 eV at the same k (hand algebra), so the two never touch.
 */
export function twoBandSemimetal(): BandStructure {
  const hole: Dispersion = cosineBand(0.1, [-0.3, -0.3, -0.3]);
  const electron: Dispersion = (_kc, kf) =>
    -0.1 +
    0.8 * (1 + Math.cos(2 * Math.PI * kf[0])) +
    0.8 * (1 - Math.cos(2 * Math.PI * kf[1])) +
    0.8 * (1 - Math.cos(2 * Math.PI * kf[2]));
  const deep = cosineBand(-6, [-0.1, -0.1, -0.1]);
  const bs = pathModel({
    lattice: cubicLattice(FE_A),
    bands: [deep, hole, electron],
    electrons: 4,
    legs: CUBIC_PATH,
    pointsPerSegment: 21,
  });
  bs.structure = { lattice: cubicLattice(FE_A), species: ['Bi'], positions: new Float64Array([0, 0, 0]) };
  bs.fermiEnergy = 0;
  return bs;
}

/**
 * A spin-polarised half-metal: spin up is the free-electron metal with its Fermi level (band 1 crosses it);
 * spin down has band 1 lowered by 6 eV (wholly below that level: its top, at R, is ħ²·3(π/a)²/2m − 6 eV
 * ≈ 1.05 eV) and the other bands raised by 6 eV (wholly above: their bottom, at X, is ħ²(π/a)²/2m + 6 eV
 * ≈ 8.35 eV), so spin down has a gap around E_F.
 */
export function halfMetal(): BandStructure {
  const bs = freeElectronMetal();
  const up = bs.energies[0]!;
  const nb = bs.nBands;
  const down = Float64Array.from(up, (x, i) => (i % nb === 0 ? x - 6 : x + 6));
  bs.nSpin = 2;
  bs.energies = [up, down];
  bs.occupations = smearedOccupations(bs, 'fermi-dirac', bs.fermiEnergy!, 0.05);
  return bs;
}

/**
 * The round-trip semiconductor (gap 1.2 eV, VBM 0 eV, CBM 1.2 eV) with Gaussian occupations of width sigma
 * around mid-gap: tails ½ erfc(0.6/σ) at the edges (1.1e-5 for σ = 0.2 eV).
 */
export function smearedSemiconductor(sigma = 0.2): BandStructure {
  const bs = collinearModel();
  bs.fermiEnergy = 0.6;
  bs.occupations = smearedOccupations(bs, 'gaussian', 0.6, sigma);
  return bs;
}
