/**
 * Cohen & Bergstresser's local empirical pseudopotentials for diamond and zincblende semiconductors:
 * M. L. Cohen and T. K. Bergstresser, Phys. Rev. 141, 789 (1966).
 *
 * The crystal potential is V(r) = Σ_G V(G) e^{iG·r} with, for two atoms at ∓τ, τ = (a/8)(1, 1, 1):
 *     V(G) = V_S(|G|²) cos(G·τ) + i V_A(|G|²) sin(G·τ)
 * (symmetric and antisymmetric form factors; V_A = 0 for the elemental diamond crystals). Form factors are
 * given at |G|² = 3, 4, 8, 11 in units of (2π/a)² and vanish at the other shells; V(G = 0) only shifts all
 * energies and is set to zero here, so energies are on the model's own (arbitrary) scale.
 *
 * Provenance of the numbers below: the model, its form (local, three shells, energies in Rydberg) and the
 * material set are those of the paper. The numeric form factors and lattice constants were recalled from
 * memory (the values as widely reproduced from the paper's table), not checked against the paper here
 * (memory). The lattice constants are room-temperature experimental values (memory).
 */

export interface EpmMaterial {
  /** Short id used in file and folder names. */
  id: string;
  /** Name for file headers. */
  name: string;
  /** Cubic lattice constant, Å. */
  latticeConstant: number;
  /** Species at −τ and +τ (written at 0 and (1/4, 1/4, 1/4) in the POSCAR). */
  species: [string, string];
  /** Symmetric form factors, Ry, keyed by |G|² in units of (2π/a)². */
  symmetric: Record<number, number>;
  /** Antisymmetric form factors, Ry, keyed by |G|² in units of (2π/a)². */
  antisymmetric: Record<number, number>;
  /** Valence electrons per primitive cell (4 per atom). */
  electrons: number;
}

/** A diamond or zincblende crystal of two four-valent atoms: 8 valence electrons per primitive cell. */
function epmMaterial(
  id: string,
  name: string,
  latticeConstant: number,
  species: [string, string],
  symmetric: Record<number, number>,
  antisymmetric: Record<number, number> = {},
): EpmMaterial {
  return { id, name, latticeConstant, species, symmetric, antisymmetric, electrons: 8 };
}

/** Silicon: V_S(3) = −0.21, V_S(8) = +0.04, V_S(11) = +0.08 Ry; a = 5.43 Å (memory). */
export const SILICON = epmMaterial('si', 'Si', 5.43, ['Si', 'Si'], { 3: -0.21, 8: 0.04, 11: 0.08 });

/** Germanium: V_S(3) = −0.23, V_S(8) = +0.01, V_S(11) = +0.06 Ry; a = 5.66 Å (memory). */
export const GERMANIUM = epmMaterial('ge', 'Ge', 5.66, ['Ge', 'Ge'], { 3: -0.23, 8: 0.01, 11: 0.06 });

/**
 * Gallium arsenide: V_S as for Ge; V_A(3) = +0.07, V_A(4) = +0.05, V_A(11) = +0.01 Ry; a = 5.64 Å (memory).
 * With V(G) = V_S cos(G·τ) + i V_A sin(G·τ), V_A = (v(−τ) − v(+τ))/2: a positive V_A puts the more
 * attractive atom (the anion, As) at +τ and Ga at −τ.
 */
export const GALLIUM_ARSENIDE = epmMaterial(
  'gaas',
  'GaAs',
  5.64,
  ['Ga', 'As'],
  { 3: -0.23, 8: 0.01, 11: 0.06 },
  { 3: 0.07, 4: 0.05, 11: 0.01 },
);

export const MATERIALS: Record<string, EpmMaterial> = { si: SILICON, ge: GERMANIUM, gaas: GALLIUM_ARSENIDE };
