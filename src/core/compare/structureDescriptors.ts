/**
 * Structural descriptors of a run, to serve as the x-axis of trends: lattice parameters, angles, volume,
 * and strain relative to a reference lattice (Green–Lagrange strain E = (FᵀF − I)/2 with F the deformation
 * gradient taking the reference cell to this one; for small strains E ≈ the engineering strain). Every strain is
 * relative to the reference run, which the outputs name ("relative to <reference>").
 *
 * A biaxial series (two principal stretches equal, the third different: a film strained in its plane) also
 * gets its in-plane strain λ∥ − 1 and out-of-plane strain λ⊥ − 1 (principal stretches λ = √(1 + 2E_i)).
 */
import type { Mat3 } from '../model';
import { det3, mat3Inverse, mulMat, norm, transpose3, dot } from '../lattice/linalg';
import { symmetricEigen3 } from '../analysis/symmetricEigen';

export interface StructureDescriptors {
  a: number;
  b: number;
  c: number;
  alpha: number;
  beta: number;
  gamma: number;
  /** Cell volume, Å³. */
  volume: number;
  /** Relative to the reference run, when one is given. */
  volumeStrain: number | null;
  /** Green–Lagrange strain tensor (cartesian), relative to the reference. */
  strain: Mat3 | null;
  /** Mean of the diagonal strain components (hydrostatic part). */
  hydrostaticStrain: number | null;
  /** Biaxial strain (two equal principal stretches): in-plane engineering strain λ∥ − 1; null otherwise. */
  inPlaneStrain: number | null;
  /** Biaxial strain: out-of-plane engineering strain λ⊥ − 1; null otherwise. */
  outOfPlaneStrain: number | null;
}

/** Principal stretches closer than this count as equal (a biaxial pair). */
const EQUAL_STRETCH = 1e-6;

/** In-plane and out-of-plane strain when the strain is biaxial (and not zero or hydrostatic). */
export function biaxialStrain(strain: Mat3): { inPlane: number; outOfPlane: number } | null {
  const sym: Mat3 = strain.map((row, i) => row.map((x, j) => (x + strain[j]![i]!) / 2)) as Mat3;
  const stretch = symmetricEigen3(sym).values.map((e) => Math.sqrt(1 + 2 * e) - 1);
  const [a, b, c] = stretch as [number, number, number];
  if (Math.abs(a - b) < EQUAL_STRETCH && Math.abs(b - c) >= EQUAL_STRETCH) return { inPlane: a, outOfPlane: c };
  if (Math.abs(b - c) < EQUAL_STRETCH && Math.abs(a - b) >= EQUAL_STRETCH) return { inPlane: b, outOfPlane: a };
  return null;
}

const deg = (x: number): number => (x * 180) / Math.PI;

export function latticeParameters(lattice: Mat3): Pick<StructureDescriptors, 'a' | 'b' | 'c' | 'alpha' | 'beta' | 'gamma' | 'volume'> {
  const [a1, a2, a3] = lattice;
  const a = norm(a1);
  const b = norm(a2);
  const c = norm(a3);
  return {
    a,
    b,
    c,
    alpha: deg(Math.acos(dot(a2, a3) / (b * c))),
    beta: deg(Math.acos(dot(a1, a3) / (a * c))),
    gamma: deg(Math.acos(dot(a1, a2) / (a * b))),
    volume: Math.abs(det3(lattice)),
  };
}

/**
 * Deformation gradient F with rows of `lattice` = rows of `reference` · Fᵀ, i.e. a_i = F a_i^ref.
 * Both lattices must describe the same cell choice (same primitive vectors, deformed).
 */
export function deformationGradient(reference: Mat3, lattice: Mat3): Mat3 {
  // L = R Fᵀ  →  Fᵀ = R⁻¹ L.
  return transpose3(mulMat(mat3Inverse(reference), lattice));
}

export function greenLagrangeStrain(reference: Mat3, lattice: Mat3): Mat3 {
  const F = deformationGradient(reference, lattice);
  const C = mulMat(transpose3(F), F);
  return C.map((row, i) => row.map((x, j) => (x - (i === j ? 1 : 0)) / 2)) as Mat3;
}

export function structureDescriptors(lattice: Mat3, reference: Mat3 | null): StructureDescriptors {
  const p = latticeParameters(lattice);
  if (!reference) return { ...p, volumeStrain: null, strain: null, hydrostaticStrain: null, inPlaneStrain: null, outOfPlaneStrain: null };
  const v0 = Math.abs(det3(reference));
  const strain = greenLagrangeStrain(reference, lattice);
  const biaxial = biaxialStrain(strain);
  return {
    ...p,
    volumeStrain: p.volume / v0 - 1,
    strain,
    hydrostaticStrain: (strain[0][0] + strain[1][1] + strain[2][2]) / 3,
    inPlaneStrain: biaxial ? biaxial.inPlane : null,
    outOfPlaneStrain: biaxial ? biaxial.outOfPlane : null,
  };
}

/** The cell's composition as sorted species with counts, e.g. "As1 Ga1": runs of one crystal share it. */
export function compositionOf(species: readonly string[]): string {
  const n = new Map<string, number>();
  for (const s of species) n.set(s, (n.get(s) ?? 0) + 1);
  return [...n.entries()]
    .sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))
    .map(([s, c]) => `${s}${c}`)
    .join(' ');
}

/** Lattice points in the conventional cubic cell, by Bravais class (common practice: cP 1, cI 2, cF 4). */
const CUBIC_LATTICE_POINTS: Readonly<Record<string, number>> = { cP: 1, cI: 2, cF: 4 };

/**
 * The conventional cubic lattice constant of a cubic crystal, from the volume per lattice point: a³ holds
 * 1 (cP), 2 (cI) or 4 (cF) lattice points, so a = (n V / p)^(1/3) for a cell of volume V holding p lattice
 * points. For the fcc primitive cell (p = 1) this is √2 times its vector length; for bcc, 2/√3 times. Null
 * for any other lattice type (a strained cubic crystal is no longer cubic: use its own cell).
 */
export function conventionalCubicA(
  latticeType: string | null | undefined,
  volume: number,
  latticePointsPerCell: number | null | undefined,
): number | null {
  const n = latticeType ? CUBIC_LATTICE_POINTS[latticeType] : undefined;
  const p = latticePointsPerCell ?? 1;
  if (n === undefined || !(volume > 0) || !(p >= 1) || !Number.isInteger(p)) return null;
  return Math.cbrt((n * volume) / p);
}
