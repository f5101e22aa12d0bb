/**
 * A tight-binding model of our own on a simple-cubic lattice (lattice constant L), with four bands:
 *
 *   deep:        E = v0 − 5 + 0.4 Σ_i c_i
 *   valence:     E = v0 + t_v Σ_i c_i                                  (maximum at Γ)
 *   conduction:  E = e_c + Σ_i (a c_i + b C_i) + B Σ_{i<j} c_i c_j      (minima on Γ–X, six of them)
 *   upper:       E = e_c + 20 + 0.3 Σ_i c_i
 *
 * with c_i = cos 2πk_i, C_i = cos 4πk_i (k fractional). Everything the tests need follows in closed form:
 * on the line (x, 0, 0) the conduction band is stationary where sin 2πx [(a + 2B) + 4b cos 2πx] = 0, so its
 * minimum lies at cos 2πx₀ = −(a + 2B)/(4b); the Hessian there is diagonal (the mixed terms carry sin 2πk_j = 0),
 * with ∂²E/∂k_x² = −L² [(a + 2B) c + 4b C] and ∂²E/∂k_y² = ∂²E/∂k_z² = −L² [a + B(1 + c) + 4b] (cartesian Å⁻¹,
 * c = cos 2πx₀, C = cos 4πx₀), and the valence band's curvature at Γ is −L² t_v in every direction.
 *
 * Used by the demo (fixtures/demo/tessellite-mesh) and by tests (test/unit/meshRunAnalysis.test.ts) with their
 * own parameters. Written on an irreducible Γ-centred mesh in VASP's layouts like an ordinary
 * self-consistent run.
 */
import type { Mat3, Vec3 } from '../../src/core/model';
import { irreducibleMesh } from '../../src/core/interpolation/regularMesh';
import { HBAR2_OVER_ME_EV_A2 } from '../../src/core/units';
import { insulatorOccupations, modelSystemName, writeEigenval, writePoscar } from '../../test/support/writers/vasp';

export interface AxisValleyParameters {
  /** Lattice constant, Å. */
  L: number;
  v0: number;
  tv: number;
  ec: number;
  a: number;
  b: number;
  B: number;
}

export const AXIS_VALLEY_BANDS = 4;

export function axisValleyBands(p: AxisValleyParameters, k: readonly number[]): Float64Array {
  const c = k.map((x) => Math.cos(2 * Math.PI * x));
  const C = k.map((x) => Math.cos(4 * Math.PI * x));
  const sum = c[0]! + c[1]! + c[2]!;
  const pairs = c[0]! * c[1]! + c[1]! * c[2]! + c[2]! * c[0]!;
  const cond = p.ec + p.a * sum + p.b * (C[0]! + C[1]! + C[2]!) + p.B * pairs;
  return new Float64Array([p.v0 - 5 + 0.4 * sum, p.v0 + p.tv * sum, cond, p.ec + 20 + 0.3 * sum]);
}

/** What the model says, in closed form (see the header). Masses in m_e. */
export function axisValleyTruth(p: AxisValleyParameters): {
  x0: number;
  cbm_eV: number;
  vbm_eV: number;
  mLongitudinal: number;
  mTransverse: number;
  mValence: number;
} {
  const c = -(p.a + 2 * p.B) / (4 * p.b);
  if (!(Math.abs(c) < 1)) throw new Error('axisValleyTruth: these parameters have no minimum inside Γ–X');
  const x0 = Math.acos(c) / (2 * Math.PI);
  const C = 2 * c * c - 1;
  const L2 = p.L * p.L;
  return {
    x0,
    cbm_eV: axisValleyBands(p, [x0, 0, 0])[2]!,
    vbm_eV: p.v0 + 3 * p.tv,
    mLongitudinal: HBAR2_OVER_ME_EV_A2 / (-L2 * ((p.a + 2 * p.B) * c + 4 * p.b * C)),
    mTransverse: HBAR2_OVER_ME_EV_A2 / (-L2 * (p.a + p.B * (1 + c) + 4 * p.b)),
    mValence: HBAR2_OVER_ME_EV_A2 / (-L2 * p.tv),
  };
}

/** The 48 operations of the cube (signed permutations): the point group of a simple-cubic crystal of one atom. */
export function cubicOperations(): Mat3[] {
  const perms = [
    [0, 1, 2],
    [0, 2, 1],
    [1, 0, 2],
    [1, 2, 0],
    [2, 0, 1],
    [2, 1, 0],
  ];
  const ops: Mat3[] = [];
  for (const p of perms) {
    for (let signs = 0; signs < 8; signs++) {
      const m: Mat3 = [
        [0, 0, 0],
        [0, 0, 0],
        [0, 0, 0],
      ];
      for (let i = 0; i < 3; i++) m[i]![p[i]!] = signs & (1 << i) ? -1 : 1;
      ops.push(m);
    }
  }
  return ops;
}

export interface MeshRunFiles {
  eigenval: string;
  poscar: string;
  nk: number;
}

/** An EIGENVAL (irreducible n×n×n Γ-centred mesh, occupations, weights = star sizes) and a POSCAR of the model. */
export function axisValleyMeshRun(p: AxisValleyParameters, n: number, description: string, species = 'Po'): MeshRunFiles {
  const lattice: Mat3 = [
    [p.L, 0, 0],
    [0, p.L, 0],
    [0, 0, p.L],
  ];
  const { kpoints, weights } = irreducibleMesh([n, n, n], [0, 0, 0], cubicOperations());
  const nk = kpoints.length / 3;
  const energies = new Float64Array(nk * AXIS_VALLEY_BANDS);
  for (let i = 0; i < nk; i++) {
    const k: Vec3 = [kpoints[3 * i]!, kpoints[3 * i + 1]!, kpoints[3 * i + 2]!];
    energies.set(axisValleyBands(p, k), i * AXIS_VALLEY_BANDS);
  }
  const eigenval = writeEigenval({
    system: modelSystemName(description),
    nIons: 1,
    electrons: 4,
    nBands: AXIS_VALLEY_BANDS,
    kpoints,
    weights,
    energies: [energies],
    occupations: [insulatorOccupations(nk, AXIS_VALLEY_BANDS, 2)],
    lattice,
  });
  const poscar = writePoscar({ comment: description, lattice, species: [species], counts: [1], positions: [[0, 0, 0]] });
  return { eigenval, poscar, nk };
}
