/** Build small BandStructure objects directly, for tests of analysis and geometry. */
import type { BandStructure, KLabel, Mat3, Structure } from '../../src/core/model';

export interface BandsSpec {
  kpoints: number[][];
  /** energies[spin][k][band] */
  energies: number[][][];
  occupations?: number[][][];
  electrons?: number | null;
  fermiEnergy?: number | null;
  lattice?: Mat3 | null;
  labels?: KLabel[];
  spinorbit?: boolean;
  sampling?: BandStructure['sampling'];
}

export function makeBands(spec: BandsSpec): BandStructure {
  const nk = spec.kpoints.length;
  const nBands = spec.energies[0]![0]!.length;
  const flat = (a: number[][]): Float64Array => {
    const out = new Float64Array(nk * nBands);
    a.forEach((row, k) => row.forEach((e, b) => (out[k * nBands + b] = e)));
    return out;
  };
  return {
    source: { format: 'test', file: 'test.bands', files: [] },
    lattice: spec.lattice ?? null,
    structure: null,
    nk,
    nBands,
    nSpin: spec.energies.length as 1 | 2,
    kpoints: Float64Array.from(spec.kpoints.flat()),
    weights: null,
    energies: spec.energies.map(flat),
    occupations: spec.occupations ? spec.occupations.map(flat) : null,
    fermiEnergy: spec.fermiEnergy ?? null,
    electrons: spec.electrons === undefined ? null : spec.electrons,
    spinorbit: spec.spinorbit ?? false,
    labels: spec.labels ?? [],
    sampling: spec.sampling ?? 'path',
    grid: null,
    writtenDistance: null,
    partial: false,
    warnings: [],
  };
}

export interface OneSpinParts {
  source: BandStructure['source'];
  lattice: Mat3 | null;
  structure: Structure | null;
  /** nk × 3 fractional k-points. */
  kpoints: Float64Array;
  nBands: number;
  /** nk × nBands energies, eV. */
  energies: Float64Array;
  electrons: number | null;
  labels: KLabel[];
  sampling: BandStructure['sampling'];
}

/** A one-spin band structure from flat arrays, without weights, occupations, Fermi level or spin-orbit. */
export function oneSpinBands(p: OneSpinParts): BandStructure {
  return {
    source: p.source,
    lattice: p.lattice,
    structure: p.structure,
    nk: p.kpoints.length / 3,
    nBands: p.nBands,
    nSpin: 1,
    kpoints: p.kpoints,
    weights: null,
    energies: [p.energies],
    occupations: null,
    fermiEnergy: null,
    electrons: p.electrons,
    spinorbit: false,
    labels: p.labels,
    sampling: p.sampling,
    grid: null,
    writtenDistance: null,
    partial: false,
    warnings: [],
  };
}

/** fcc primitive vectors for a conventional cubic constant a (Å). */
export function fccLattice(a: number): Mat3 {
  return [
    [0, a / 2, a / 2],
    [a / 2, 0, a / 2],
    [a / 2, a / 2, 0],
  ];
}

/** Points evenly spaced from p to q (n points including both ends). */
export function line(p: number[], q: number[], n: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < n; i++) {
    const t = i / (n - 1);
    out.push(p.map((x, j) => x + (q[j]! - x) * t));
  }
  return out;
}
