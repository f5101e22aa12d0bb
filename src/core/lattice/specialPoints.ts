/**
 * Recognising high-symmetry k-points and giving them their standard labels, for runs whose path file
 * (e.g. KPOINTS) is missing but whose lattice is known.
 *
 * Convention: W. Setyawan and S. Curtarolo, "High-throughput electronic band structure calculations:
 * challenges and tools", Comput. Mater. Sci. 49, 299 (2010): for each Bravais lattice, a standard primitive
 * cell and the fractional coordinates of its special points in that cell's reciprocal basis (tables below as
 * recalled (memory); the unit tests check each point against the zone's cartesian geometry). Covered here:
 * simple cubic (CUB), face-centred cubic (FCC), body-centred cubic (BCC), hexagonal (HEX), simple tetragonal
 * (TET), body-centred tetragonal (BCT1, c < a; BCT2, c > a: e.g. fcc crystals under (001) strain) and simple
 * orthorhombic (ORC). Other lattices (centred orthorhombic, rhombohedral, monoclinic, triclinic) are not
 * labelled.
 *
 * Any choice of the user's cell works: the integer matrix M with A_user = M · A_std (rows; up to a rigid
 * rotation) is found by matching metric tensors, so k_user = M k_std. A k-point gets a label when it equals a
 * special point's image under the lattice's point group, first exactly, else modulo a reciprocal lattice
 * vector of the primitive lattice.
 */
import type { BandStructure, KLabel, Mat3, Structure, Vec3 } from '../model';
import { mat3Inverse, mulMatVec } from './linalg';
import { relateCells } from './cellRelation';
import { bravaisLattice, latticeOnlyStructure, type BravaisLattice } from './bravais';
import { crystalSymmetry, DEFAULT_SYMPREC, sameModuloG } from './symmetry';
import { labelsOfKpoints } from './kpointLabelScan';
import { latticeHolohedry } from './latticePointGroup';

export type LabelledLatticeKind = 'CUB' | 'FCC' | 'BCC' | 'HEX' | 'TET' | 'BCT1' | 'BCT2' | 'ORC';

export interface SpecialPoint {
  label: string;
  /** Fractional coordinates in the reciprocal basis of the standard primitive cell. */
  k: Vec3;
}

export interface StandardCell {
  kind: LabelledLatticeKind;
  /** Standard primitive cell rows, Å. */
  primitive: Mat3;
  points: SpecialPoint[];
}

const BRAVAIS_TO_KIND: Record<string, LabelledLatticeKind> = {
  cP: 'CUB',
  cF: 'FCC',
  cI: 'BCC',
  hP: 'HEX',
  tP: 'TET',
  tI: 'BCT1',
  oP: 'ORC',
};

/** Standard primitive cell and special points of Setyawan & Curtarolo (2010) for a Bravais lattice, or null. */
export function standardCell(b: BravaisLattice): StandardCell | null {
  const kind = BRAVAIS_TO_KIND[b.bravaisClass];
  if (!kind) return null;
  const [l1, l2, l3] = b.lengths;
  const h = 0.5;
  switch (kind) {
    case 'CUB': {
      const a = (l1 + l2 + l3) / 3;
      return {
        kind,
        primitive: [
          [a, 0, 0],
          [0, a, 0],
          [0, 0, a],
        ],
        points: [pt('Γ', 0, 0, 0), pt('M', h, h, 0), pt('R', h, h, h), pt('X', 0, h, 0)],
      };
    }
    case 'FCC': {
      const a = (l1 + l2 + l3) / 3;
      return {
        kind,
        primitive: [
          [0, a / 2, a / 2],
          [a / 2, 0, a / 2],
          [a / 2, a / 2, 0],
        ],
        points: [
          pt('Γ', 0, 0, 0),
          pt('K', 3 / 8, 3 / 8, 3 / 4),
          pt('L', h, h, h),
          pt('U', 5 / 8, 1 / 4, 5 / 8),
          pt('W', h, 1 / 4, 3 / 4),
          pt('X', h, 0, h),
        ],
      };
    }
    case 'BCC': {
      const a = (l1 + l2 + l3) / 3;
      return {
        kind,
        primitive: [
          [-a / 2, a / 2, a / 2],
          [a / 2, -a / 2, a / 2],
          [a / 2, a / 2, -a / 2],
        ],
        points: [pt('Γ', 0, 0, 0), pt('H', h, -h, h), pt('P', 1 / 4, 1 / 4, 1 / 4), pt('N', 0, 0, h)],
      };
    }
    case 'HEX': {
      const a = (l1 + l2) / 2;
      const c = l3;
      const s = (Math.sqrt(3) / 2) * a;
      return {
        kind,
        primitive: [
          [a / 2, -s, 0],
          [a / 2, s, 0],
          [0, 0, c],
        ],
        points: [
          pt('Γ', 0, 0, 0),
          pt('A', 0, 0, h),
          pt('H', 1 / 3, 1 / 3, h),
          pt('K', 1 / 3, 1 / 3, 0),
          pt('L', h, 0, h),
          pt('M', h, 0, 0),
        ],
      };
    }
    case 'TET': {
      const a = (l1 + l2) / 2;
      const c = l3;
      return {
        kind,
        primitive: [
          [a, 0, 0],
          [0, a, 0],
          [0, 0, c],
        ],
        points: [pt('Γ', 0, 0, 0), pt('A', h, h, h), pt('M', h, h, 0), pt('R', 0, h, h), pt('X', 0, h, 0), pt('Z', 0, 0, h)],
      };
    }
    case 'BCT1':
    case 'BCT2': {
      // Body-centred tetragonal (e.g. fcc crystals under (001) strain): BCT1 when c < a, BCT2 when c > a.
      const a = (l1 + l2) / 2;
      const c = l3;
      const primitive: Mat3 = [
        [-a / 2, a / 2, c / 2],
        [a / 2, -a / 2, c / 2],
        [a / 2, a / 2, -c / 2],
      ];
      if (c < a) {
        const eta = (1 + (c * c) / (a * a)) / 4;
        return {
          kind: 'BCT1',
          primitive,
          points: [
            pt('Γ', 0, 0, 0),
            pt('M', -h, h, h),
            pt('N', 0, h, 0),
            pt('P', 1 / 4, 1 / 4, 1 / 4),
            pt('X', 0, 0, h),
            pt('Z', eta, eta, -eta),
            pt('Z₁', -eta, 1 - eta, eta),
          ],
        };
      }
      const eta = (1 + (a * a) / (c * c)) / 4;
      const zeta = (a * a) / (2 * c * c);
      return {
        kind: 'BCT2',
        primitive,
        points: [
          pt('Γ', 0, 0, 0),
          pt('N', 0, h, 0),
          pt('P', 1 / 4, 1 / 4, 1 / 4),
          pt('Σ', -eta, eta, eta),
          pt('Σ₁', eta, 1 - eta, -eta),
          pt('X', 0, 0, h),
          pt('Y', -zeta, zeta, h),
          pt('Y₁', h, h, -zeta),
          pt('Z', h, h, -h),
        ],
      };
    }
    case 'ORC': {
      // Setyawan & Curtarolo order the axes a < b < c.
      const [a, bb, c] = [l1, l2, l3].sort((x, y) => x - y) as [number, number, number];
      return {
        kind,
        primitive: [
          [a, 0, 0],
          [0, bb, 0],
          [0, 0, c],
        ],
        points: [
          pt('Γ', 0, 0, 0),
          pt('R', h, h, h),
          pt('S', h, h, 0),
          pt('T', 0, h, h),
          pt('U', h, 0, h),
          pt('X', h, 0, 0),
          pt('Y', 0, h, 0),
          pt('Z', 0, 0, h),
        ],
      };
    }
  }
}

function pt(label: string, x: number, y: number, z: number): SpecialPoint {
  return { label, k: [x, y, z] };
}

export interface SpecialPointMap {
  kind: LabelledLatticeKind;
  bravais: BravaisLattice;
  standard: StandardCell;
  /** A_user = M · A_std (rows): k_user = M k_std. */
  M: Mat3;
  /** For each special point, its distinct images in the standard reciprocal basis under the lattice's point group. */
  images: { label: string; k: Vec3[] }[];
  /** Each special point in the user's fractional reciprocal coordinates. */
  userPoints: SpecialPoint[];
}

/** Order of the lattice point group (holohedry) of each kind: m-3m, 6/mmm, 4/mmm, mmm. */
const HOLOHEDRY_ORDER: Record<LabelledLatticeKind, number> = { CUB: 48, FCC: 48, BCC: 48, HEX: 24, TET: 16, BCT1: 16, BCT2: 16, ORC: 8 };

/**
 * The special points of a lattice, related to the user's cell. Null when the lattice is not one covered here
 * or when the user's cell could not be related to the standard one. Needs ensureSymmetryReady() first.
 */
export function specialPointMap(lattice: Mat3, structure: Structure | null, symprec: number = DEFAULT_SYMPREC): SpecialPointMap | null {
  const bravais = bravaisLattice(lattice, structure, symprec);
  const standard = standardCell(bravais);
  if (!standard) return null;
  const M = relateCells(structure ? structure.lattice : lattice, standard.primitive);
  if (!M) return null;
  // The lattice's point group, in the standard cell's basis, acting on k: (W⁻¹)ᵀ.
  // Found directly from the cell's metric when it shows exactly the holohedry of its kind; else by the library.
  const holohedry =
    latticeHolohedry(standard.primitive, symprec, HOLOHEDRY_ORDER[standard.kind]) ??
    crystalSymmetry(latticeOnlyStructure(standard.primitive), symprec).reciprocalPointGroup;
  const images = standard.points.map((p) => {
    const list: Vec3[] = [];
    for (const r of holohedry) {
      const q = mulMatVec(r, p.k);
      if (!list.some((s) => maxDiff(s, q) < 1e-9)) list.push(q);
    }
    return { label: p.label, k: list };
  });
  const userPoints = standard.points.map((p) => ({ label: p.label, k: mulMatVec(M, p.k).map((x) => x + 0) as Vec3 }));
  return { kind: standard.kind, bravais, standard, M, images, userPoints };
}

function maxDiff(a: Vec3, b: Vec3): number {
  return Math.max(Math.abs(a[0] - b[0]), Math.abs(a[1] - b[1]), Math.abs(a[2] - b[2]));
}

/** Tolerance for a k-point to sit on a special point, in fractional reciprocal coordinates. */
export const LABEL_TOLERANCE = 1e-4;

/** The label of one k-point (user's fractional reciprocal coordinates), or null. */
export function labelOfK(map: SpecialPointMap, kUser: Vec3, invM: Mat3 = mat3Inverse(map.M), tol = LABEL_TOLERANCE): string | null {
  const ks = mulMatVec(invM, kUser);
  for (const p of map.images) if (p.k.some((q) => maxDiff(q, ks) < tol)) return p.label;
  for (const p of map.images) if (p.k.some((q) => sameModuloG(q, ks, tol))) return p.label;
  return null;
}

export interface RecognisedLabels {
  labels: KLabel[];
  /** The lattice whose convention was used, or null when none applies. */
  kind: LabelledLatticeKind | null;
  /** Bravais class found, when symmetry could be determined. */
  bravaisClass: string | null;
  /** Why no labels could be given, when none were. */
  reason: string | null;
}

/** Labels for the k-points of a band structure from its lattice (and structure when known). */
export function recogniseSpecialPoints(bs: BandStructure, symprec: number = DEFAULT_SYMPREC): RecognisedLabels {
  const lattice = bs.structure?.lattice ?? bs.lattice;
  if (!lattice) return { labels: [], kind: null, bravaisClass: null, reason: 'no lattice is known' };
  const map = specialPointMap(lattice, bs.structure, symprec);
  if (!map) {
    const b = bravaisLattice(lattice, bs.structure, symprec);
    const covered = standardCell(b) !== null;
    return {
      labels: [],
      kind: null,
      bravaisClass: b.bravaisClass,
      reason: covered
        ? `the cell could not be related to the standard ${b.bravaisClass} cell`
        : `special-point labels are recognised for cubic, hexagonal, tetragonal and simple orthorhombic lattices, not for ${b.bravaisClass}`,
    };
  }
  const labels = labelsOfKpoints(map, bs.kpoints, bs.nk, LABEL_TOLERANCE);
  return {
    labels,
    kind: map.kind,
    bravaisClass: map.bravais.bravaisClass,
    reason: labels.length ? null : 'no k-point sits on a special point',
  };
}

/** Labels for the k-points of a band structure (empty when none can be recognised). */
export function recogniseLabels(bs: BandStructure): KLabel[] {
  return recogniseSpecialPoints(bs).labels;
}
