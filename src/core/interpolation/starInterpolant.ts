/**
 * One band as a sum of star functions, ε(k) = Σ_m c_m S_m(k), with its analytic gradient and Hessian
 * (cartesian, eV·Å and eV·Å²): ∂/∂k cos(k·R) = −R sin(k·R), ∂²/∂k∂k cos(k·R) = −R Rᵀ cos(k·R).
 *
 * With R = Σ_a n_a a_a the phase is Σ_a n_a θ_a, θ_a = k·a_a, so cos and sin of every member come from three
 * short tables of exp(i n θ_a) by two complex products; derivatives are summed in lattice coordinates and
 * turned cartesian at the end (∂θ_a/∂k = a_a).
 */
import type { Mat3, Vec3 } from '../model';
import type { StarBasis } from './starBasis';

export interface BandDerivatives {
  value: number;
  gradient: Vec3;
  hessian: Mat3;
}

/** What the Newton refinement and the uncertainty need of an interpolated band. */
export interface SmoothBand {
  value(k: Vec3): number;
  derivatives(k: Vec3): BandDerivatives;
}

export class StarInterpolant implements SmoothBand {
  /** c_m times the star's weight, per kept member. */
  private readonly memberCoefficient: Float64Array;
  private readonly integer: Int32Array;
  /** Per member, the positions of n_0, n_1, n_2 in the phase tables (axis a's table starts at a·(2·reach + 1)). */
  private readonly tableIndex: Int32Array;
  /** Largest |n_a| of any member, and the tables exp(i n θ_a) for n in −reach..reach (3 axes). */
  private readonly reach: number;
  private readonly tableCos: Float64Array;
  private readonly tableSin: Float64Array;

  constructor(
    readonly basis: StarBasis,
    readonly coefficients: Float64Array,
  ) {
    this.integer = basis.integer;
    this.memberCoefficient = new Float64Array(basis.members.length / 3);
    for (let m = 0; m < basis.count; m++) {
      const f = coefficients[m]! * basis.weight[m]!;
      for (let j = basis.start[m]!; j < basis.start[m + 1]!; j++) this.memberCoefficient[j] = f;
    }
    const reach = reachOf(basis);
    this.reach = reach;
    const width = 2 * reach + 1;
    this.tableIndex = new Int32Array(this.integer.length);
    for (let j = 0; j < this.integer.length; j++) this.tableIndex[j] = this.integer[j]! + (j % 3) * width + reach;
    this.tableCos = new Float64Array(3 * (2 * reach + 1));
    this.tableSin = new Float64Array(3 * (2 * reach + 1));
  }

  /** Fills the phase tables at cartesian k. */
  private tables(k: Vec3): void {
    const { reach, tableCos, tableSin } = this;
    const width = 2 * reach + 1;
    const a = this.basis.lattice;
    for (let axis = 0; axis < 3; axis++) {
      const theta = k[0] * a[axis]![0] + k[1] * a[axis]![1] + k[2] * a[axis]![2];
      const o = axis * width + reach;
      for (let n = -reach; n <= reach; n++) {
        tableCos[o + n] = Math.cos(n * theta);
        tableSin[o + n] = Math.sin(n * theta);
      }
    }
  }

  /** ε(k), k cartesian Å⁻¹. */
  value(k: Vec3): number {
    this.tables(k);
    const { tableIndex: t, memberCoefficient: c, tableCos: tc, tableSin: ts } = this;
    let e = 0;
    for (let j = 0; j < c.length; j++) {
      const i0 = t[3 * j]!;
      const i1 = t[3 * j + 1]!;
      const i2 = t[3 * j + 2]!;
      const cr = tc[i0]! * tc[i1]! - ts[i0]! * ts[i1]!;
      const ci = tc[i0]! * ts[i1]! + ts[i0]! * tc[i1]!;
      e += c[j]! * (cr * tc[i2]! - ci * ts[i2]!);
    }
    return e;
  }

  /** ε, ∇ε and the Hessian at cartesian k. */
  derivatives(k: Vec3): BandDerivatives {
    this.tables(k);
    const { integer: z, tableIndex: t, memberCoefficient: c, tableCos: tc, tableSin: ts } = this;
    let e = 0;
    let g0 = 0,
      g1 = 0,
      g2 = 0;
    let h00 = 0,
      h01 = 0,
      h02 = 0,
      h11 = 0,
      h12 = 0,
      h22 = 0;
    for (let j = 0; j < c.length; j++) {
      const n0 = z[3 * j]!;
      const n1 = z[3 * j + 1]!;
      const n2 = z[3 * j + 2]!;
      const i0 = t[3 * j]!;
      const i1 = t[3 * j + 1]!;
      const i2 = t[3 * j + 2]!;
      const cr = tc[i0]! * tc[i1]! - ts[i0]! * ts[i1]!;
      const ci = tc[i0]! * ts[i1]! + ts[i0]! * tc[i1]!;
      const cs = c[j]! * (cr * tc[i2]! - ci * ts[i2]!);
      const sn = c[j]! * (cr * ts[i2]! + ci * tc[i2]!);
      e += cs;
      g0 -= n0 * sn;
      g1 -= n1 * sn;
      g2 -= n2 * sn;
      h00 -= n0 * n0 * cs;
      h01 -= n0 * n1 * cs;
      h02 -= n0 * n2 * cs;
      h11 -= n1 * n1 * cs;
      h12 -= n1 * n2 * cs;
      h22 -= n2 * n2 * cs;
    }
    // Cartesian: ∇_k = Σ_a a_a ∂/∂θ_a; Hessian Aᵀ H_θ A with the lattice rows A.
    const a = this.basis.lattice;
    const gt = [g0, g1, g2];
    const ht = [
      [h00, h01, h02],
      [h01, h11, h12],
      [h02, h12, h22],
    ];
    const gradient = [0, 1, 2].map((x) => a[0][x]! * gt[0]! + a[1][x]! * gt[1]! + a[2][x]! * gt[2]!) as Vec3;
    const hessian = [0, 1, 2].map((x) =>
      [0, 1, 2].map((y) => {
        let acc = 0;
        for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) acc += a[p]![x]! * ht[p]![q]! * a[q]![y]!;
        return acc;
      }),
    ) as Mat3;
    return { value: e, gradient, hessian };
  }
}

const reaches = new WeakMap<StarBasis, number>();

/** Largest |n_a| of any member of the basis (computed once per basis). */
function reachOf(basis: StarBasis): number {
  let reach = reaches.get(basis);
  if (reach === undefined) {
    reach = 0;
    for (const x of basis.integer) reach = Math.max(reach, Math.abs(x));
    reaches.set(basis, reach);
  }
  return reach;
}
