/**
 * Band energies of the local empirical pseudopotential model in a plane-wave basis:
 *     H_{G,G'}(k) = |k + G|² δ_{GG'} + V(G − G')      (Rydberg units: ħ²/2m = 1 Ry·bohr²)
 * The basis is one fixed set of reciprocal lattice vectors (all G with |G|² ≤ cutoff in units of (2π/a)² of
 * the unstrained crystal, chosen by Miller indices so a strained crystal keeps the same set), the same at
 * every k. A fixed set gives bands that are smooth in k (a k-centred sphere |k + G|² ≤ E_cut adds or drops
 * plane waves as k moves: jumps of several meV here, which would spoil curvature fits), and, being made of
 * whole stars of the cubic group, E(Rk) = E(k) exactly for the point group. What it does not keep exactly
 * are relations that need a reciprocal-lattice translation (degeneracies at X and W, E(L + q) = E(L − q)):
 * at the default cutoff these hold to about 1 meV (0.9 meV for silicon's X1 conduction pair, 0.2 meV for the
 * asymmetry of germanium's L valley at q = 0.05), against 4 and 1.4 meV with 113 plane waves (|G|² ≤ 21).
 *
 * Output energies are in eV (Rydberg from CODATA 2018 via src/core/units.ts), V(G = 0) = 0: the model's own
 * energy zero, not aligned to anything physical.
 */
import type { Vec3 } from '../../src/core/model';
import { BOHR_ANGSTROM, RYDBERG_EV } from '../../src/core/units';
import { reciprocalLattice } from '../../src/core/lattice/reciprocal';
import { cellVolume, fccLattice, type EpmCrystal } from './crystal';
import { formFactorAt } from './formFactor';
import { hermitianEigenvalues } from './hermitianEigenvalues';

/** Default cutoff, (2π/a)²: the 169 plane waves with |G|² ≤ 27 (reciprocal-lattice shells up to 27). */
export const DEFAULT_CUTOFF = 27;

export class EpmBandSolver {
  readonly size: number;
  /** Miller indices (integer coordinates in the reciprocal basis) of the basis vectors. */
  readonly miller: Int32Array;
  private readonly gCart: Float64Array;
  private readonly vRe: Float64Array;
  private readonly vIm: Float64Array | null;
  private readonly reciprocal: [Vec3, Vec3, Vec3];
  private readonly bohr2 = BOHR_ANGSTROM * BOHR_ANGSTROM;

  constructor(
    readonly crystal: EpmCrystal,
    cutoff = DEFAULT_CUTOFF,
  ) {
    const a0 = crystal.material.latticeConstant;
    const unit = (2 * Math.PI) / a0;
    const b0 = reciprocalLattice(fccLattice(a0));
    const b = reciprocalLattice(crystal.lattice);
    this.reciprocal = b;
    const millers: number[] = [];
    const reach = Math.ceil(Math.sqrt(cutoff)) + 1;
    for (let m1 = -reach; m1 <= reach; m1++) {
      for (let m2 = -reach; m2 <= reach; m2++) {
        for (let m3 = -reach; m3 <= reach; m3++) {
          const gx = m1 * b0[0][0] + m2 * b0[1][0] + m3 * b0[2][0];
          const gy = m1 * b0[0][1] + m2 * b0[1][1] + m3 * b0[2][1];
          const gz = m1 * b0[0][2] + m2 * b0[1][2] + m3 * b0[2][2];
          const g2 = (gx * gx + gy * gy + gz * gz) / (unit * unit);
          if (g2 <= cutoff + 1e-9) millers.push(m1, m2, m3);
        }
      }
    }
    const n = millers.length / 3;
    this.size = n;
    this.miller = Int32Array.from(millers);
    this.gCart = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const [m1, m2, m3] = [millers[3 * i]!, millers[3 * i + 1]!, millers[3 * i + 2]!];
      this.gCart[3 * i] = m1 * b[0][0] + m2 * b[1][0] + m3 * b[2][0];
      this.gCart[3 * i + 1] = m1 * b[0][1] + m2 * b[1][1] + m3 * b[2][1];
      this.gCart[3 * i + 2] = m1 * b[0][2] + m2 * b[1][2] + m3 * b[2][2];
    }
    // Potential matrix: independent of k, built once. Energies in Ry.
    const volumeFactor = cellVolume(fccLattice(a0)) / cellVolume(crystal.lattice);
    const { symmetric, antisymmetric } = crystal.material;
    const complex = Object.keys(antisymmetric).length > 0;
    this.vRe = new Float64Array(n * n);
    this.vIm = complex ? new Float64Array(n * n) : null;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (i === j) continue;
        const d1 = millers[3 * i]! - millers[3 * j]!;
        const d2 = millers[3 * i + 1]! - millers[3 * j + 1]!;
        const d3 = millers[3 * i + 2]! - millers[3 * j + 2]!;
        const gx = d1 * b[0][0] + d2 * b[1][0] + d3 * b[2][0];
        const gy = d1 * b[0][1] + d2 * b[1][1] + d3 * b[2][1];
        const gz = d1 * b[0][2] + d2 * b[1][2] + d3 * b[2][2];
        const q2 = (gx * gx + gy * gy + gz * gz) / (unit * unit);
        // G·τ with τ = (1/8)(a1 + a2 + a3): 2π (m1 + m2 + m3) / 8, unchanged by a homogeneous strain.
        const phase = (2 * Math.PI * (d1 + d2 + d3)) / 8;
        const vs = formFactorAt(symmetric, q2) * volumeFactor;
        this.vRe[i * n + j] = vs * Math.cos(phase);
        if (this.vIm) this.vIm[i * n + j] = formFactorAt(antisymmetric, q2) * volumeFactor * Math.sin(phase);
      }
    }
  }

  /** The lowest `nBands` energies (eV, ascending) at k given in fractional reciprocal coordinates. */
  bandsAt(kFractional: Vec3, nBands: number): Float64Array {
    const n = this.size;
    const b = this.reciprocal;
    const kx = kFractional[0] * b[0][0] + kFractional[1] * b[1][0] + kFractional[2] * b[2][0];
    const ky = kFractional[0] * b[0][1] + kFractional[1] * b[1][1] + kFractional[2] * b[2][1];
    const kz = kFractional[0] * b[0][2] + kFractional[1] * b[1][2] + kFractional[2] * b[2][2];
    const re = Float64Array.from(this.vRe);
    for (let i = 0; i < n; i++) {
      const x = kx + this.gCart[3 * i]!;
      const y = ky + this.gCart[3 * i + 1]!;
      const z = kz + this.gCart[3 * i + 2]!;
      re[i * n + i] = (x * x + y * y + z * z) * this.bohr2;
    }
    const ev = hermitianEigenvalues(n, re, this.vIm);
    const out = new Float64Array(Math.min(nBands, n));
    for (let i = 0; i < out.length; i++) out[i] = ev[i]! * RYDBERG_EV;
    return out;
  }
}
