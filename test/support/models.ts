/**
 * Analytic model band structures for the effective-mass tests, built directly as BandStructure objects:
 * free electron, cosine tight-binding (cubic and orthorhombic), a valley between sampled points, and the
 * Kane non-parabolic dispersion. Every model's masses are known in closed form.
 */
import type { BandStructure, KLabel, Mat3, Structure, Vec3 } from '../../src/core/model';
import { reciprocalLattice } from '../../src/core/lattice/reciprocal';
import { HBAR2_OVER_ME_EV_A2 } from '../../src/core/units';
import { oneSpinBands } from './bandStructure';

/** A band as a function of cartesian k (Å⁻¹) and fractional k. */
export type Dispersion = (kc: Vec3, kf: Vec3) => number;

export interface PathLeg {
  label: string;
  k: Vec3;
}

function cartesian(kf: Vec3, rec: Mat3): Vec3 {
  return [
    kf[0] * rec[0][0] + kf[1] * rec[1][0] + kf[2] * rec[2][0],
    kf[0] * rec[0][1] + kf[1] * rec[1][1] + kf[2] * rec[2][1],
    kf[0] * rec[0][2] + kf[1] * rec[1][2] + kf[2] * rec[2][2],
  ];
}

export interface ModelOptions {
  lattice: Mat3;
  bands: Dispersion[];
  /** Electrons (2 per band, no spin): fills the lowest bands. */
  electrons: number;
  structure?: Structure | null;
  /** Energy rounding of the written file (e.g. 1e-4 eV), none when omitted. */
  roundTo?: number;
}

function assemble(opts: ModelOptions, kf: Vec3[], labels: KLabel[], sampling: BandStructure['sampling']): BandStructure {
  const rec = reciprocalLattice(opts.lattice);
  const nk = kf.length;
  const nb = opts.bands.length;
  const kpoints = new Float64Array(nk * 3);
  const energies = new Float64Array(nk * nb);
  kf.forEach((k, i) => {
    kpoints.set(k, 3 * i);
    const kc = cartesian(k, rec);
    const row = opts.bands.map((f) => f(kc, k)).sort((a, b) => a - b);
    row.forEach((e, b) => {
      energies[i * nb + b] = opts.roundTo ? Math.round(e / opts.roundTo) * opts.roundTo : e;
    });
  });
  return oneSpinBands({
    source: { format: 'model', file: 'model', files: [] },
    lattice: opts.lattice,
    structure: opts.structure ?? null,
    kpoints,
    nBands: nb,
    energies,
    electrons: opts.electrons,
    labels,
    sampling,
  });
}

/**
 * A line-mode path like a band run writes it: each leg is a list of labelled corners; consecutive segments
 * of a leg repeat their shared corner (as line-mode k-point files do); legs are disconnected (a jump).
 */
export function pathModel(opts: ModelOptions & { legs: PathLeg[][]; pointsPerSegment: number }): BandStructure {
  const kf: Vec3[] = [];
  const labels: KLabel[] = [];
  const n = opts.pointsPerSegment;
  for (const leg of opts.legs) {
    for (let s = 0; s + 1 < leg.length; s++) {
      const a = leg[s]!;
      const b = leg[s + 1]!;
      for (let i = 0; i < n; i++) {
        const f = i / (n - 1);
        if (i === 0) labels.push({ index: kf.length, label: a.label });
        if (i === n - 1) labels.push({ index: kf.length, label: b.label });
        kf.push([a.k[0] + f * (b.k[0] - a.k[0]), a.k[1] + f * (b.k[1] - a.k[1]), a.k[2] + f * (b.k[2] - a.k[2])]);
      }
    }
  }
  return assemble(opts, kf, labels, 'path');
}

/** An explicit list of k-points (a grid or a stencil run). */
export function pointsModel(opts: ModelOptions & { kpoints: Vec3[]; sampling?: BandStructure['sampling'] }): BandStructure {
  return assemble(opts, opts.kpoints, [], opts.sampling ?? 'points');
}

/** A Γ-centred uniform grid of dims[0]×dims[1]×dims[2] points over the whole zone, first index slowest. */
export function gridModel(opts: ModelOptions & { dims: Vec3 }): BandStructure {
  const kf: Vec3[] = [];
  const [n1, n2, n3] = opts.dims;
  for (let i = 0; i < n1; i++) for (let j = 0; j < n2; j++) for (let l = 0; l < n3; l++) kf.push([i / n1, j / n2, l / n3]);
  const bs = assemble(opts, kf, [], 'grid');
  bs.grid = { dims: opts.dims, origin: [0, 0, 0], endpointsRepeated: false };
  return bs;
}

// ----------------------------------------------------------------------------------------------------------
// Lattices and dispersions.

export function cubicLattice(a: number): Mat3 {
  return [
    [a, 0, 0],
    [0, a, 0],
    [0, 0, a],
  ];
}

export function orthorhombicLattice(a: number, b: number, c: number): Mat3 {
  return [
    [a, 0, 0],
    [0, b, 0],
    [0, 0, c],
  ];
}

/** Rows of `lattice` rotated by the proper rotation `q` (r → q r). */
export function rotateLattice(lattice: Mat3, q: Mat3): Mat3 {
  return lattice.map((row) => [
    q[0][0] * row[0] + q[0][1] * row[1] + q[0][2] * row[2],
    q[1][0] * row[0] + q[1][1] * row[1] + q[1][2] * row[2],
    q[2][0] * row[0] + q[2][1] * row[1] + q[2][2] * row[2],
  ]) as Mat3;
}

/** Rotation by `angle` about the unit axis `u` (Rodrigues' formula). */
export function rotation(u: Vec3, angle: number): Mat3 {
  const n = Math.hypot(...u);
  const [x, y, z] = [u[0] / n, u[1] / n, u[2] / n];
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  const C = 1 - c;
  return [
    [c + x * x * C, x * y * C - z * s, x * z * C + y * s],
    [y * x * C + z * s, c + y * y * C, y * z * C - x * s],
    [z * x * C - y * s, z * y * C + x * s, c + z * z * C],
  ];
}

/** Parabolic band E0 + sign·ħ²|k - k0|²/2m (free electron when m = 1). */
export function parabolicBand(e0: number, mass: number, k0: Vec3 = [0, 0, 0]): Dispersion {
  return (kc) => e0 + (HBAR2_OVER_ME_EV_A2 / (2 * mass)) * ((kc[0] - k0[0]) ** 2 + (kc[1] - k0[1]) ** 2 + (kc[2] - k0[2]) ** 2);
}

/**
 * Nearest-neighbour tight-binding band on an orthorhombic lattice with the axes along x, y, z in the crystal
 * frame: E = e0 + Σ_i 2 t_i (1 − cos 2π k_i) with k_i fractional. Its mass along axis i at Γ is
 * ħ²/(2 t_i a_i²) (analytic: E ≈ e0 + t_i a_i² k_i², cartesian k_i = 2π k_i/a_i). Negative t gives a maximum.
 */
export function cosineBand(e0: number, t: Vec3): Dispersion {
  return (_kc, kf) =>
    e0 +
    2 * t[0] * (1 - Math.cos(2 * Math.PI * kf[0])) +
    2 * t[1] * (1 - Math.cos(2 * Math.PI * kf[1])) +
    2 * t[2] * (1 - Math.cos(2 * Math.PI * kf[2]));
}

/** Analytic mass of the cosine band along an axis of length a with hopping t: ħ²/(2 t a²), in m_e. */
export function cosineMass(t: number, a: number): number {
  return HBAR2_OVER_ME_EV_A2 / (2 * t * a * a);
}

/** Kane dispersion ε(1 + αε) = ħ²k²/2m, ε above e0 (a conduction band). */
export function kaneBand(e0: number, mass: number, alpha: number): Dispersion {
  return (kc) => {
    const a = HBAR2_OVER_ME_EV_A2 / (2 * mass);
    const k2 = kc[0] ** 2 + kc[1] ** 2 + kc[2] ** 2;
    return e0 + (alpha === 0 ? a * k2 : (-1 + Math.sqrt(1 + 4 * alpha * a * k2)) / (2 * alpha));
  };
}

/** A flat band at energy e (fills a slot without curvature). */
export function flatBand(e: number): Dispersion {
  return () => e;
}

/**
 * An ellipsoidal valley centred at cartesian k0 with longitudinal mass ml along the unit axis u and
 * transverse mass mt across it (Si-like Δ valley when k0 lies 85 % of the way to X along u).
 */
export function ellipsoidalValley(e0: number, k0: Vec3, u: Vec3, ml: number, mt: number): Dispersion {
  return (kc) => {
    const d: Vec3 = [kc[0] - k0[0], kc[1] - k0[1], kc[2] - k0[2]];
    const l = d[0] * u[0] + d[1] * u[1] + d[2] * u[2];
    const t2 = d[0] ** 2 + d[1] ** 2 + d[2] ** 2 - l * l;
    return e0 + (HBAR2_OVER_ME_EV_A2 / 2) * ((l * l) / ml + t2 / mt);
  };
}

/** fcc primitive vectors a1 = (0, a/2, a/2), a2 = (a/2, 0, a/2), a3 = (a/2, a/2, 0) (common practice). */
export function fccLattice(a: number): Mat3 {
  return [
    [0, a / 2, a / 2],
    [a / 2, 0, a / 2],
    [a / 2, a / 2, 0],
  ];
}

/** Diamond (one species) or zincblende (two) in the fcc primitive cell: atoms at 0 and (1/4, 1/4, 1/4). */
export function diamondStructure(a: number, s1: string, s2: string = s1): Structure {
  return { lattice: fccLattice(a), species: [s1, s2], positions: new Float64Array([0, 0, 0, 0.25, 0.25, 0.25]) };
}

/** A simple cubic crystal with one atom per cell (point group m-3m). */
export function simpleCubicStructure(a: number, s = 'Po'): Structure {
  return { lattice: cubicLattice(a), species: [s], positions: new Float64Array([0, 0, 0]) };
}

/** The smallest of several dispersions: one band made of several valleys (kinks where they meet). */
export function lowestOf(...fs: Dispersion[]): Dispersion {
  return (kc, kf) => Math.min(...fs.map((f) => f(kc, kf)));
}
