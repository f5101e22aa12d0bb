/**
 * One band as a sum of star functions, ε(k) = Σ_m c_m S_m(k), with its analytic gradient and Hessian
 * (cartesian, eV·Å and eV·Å²): ∂/∂k cos(k·R) = −R sin(k·R), ∂²/∂k∂k cos(k·R) = −R Rᵀ cos(k·R).
 */
import type { Mat3, Vec3 } from '../model';
import type { StarBasis } from './starBasis';

export interface BandDerivatives {
  value: number;
  gradient: Vec3;
  hessian: Mat3;
}

export class StarInterpolant {
  /** c_m times the star's weight, per kept member. */
  private readonly memberCoefficient: Float64Array;
  private readonly members: Float64Array;

  constructor(
    readonly basis: StarBasis,
    readonly coefficients: Float64Array,
  ) {
    this.members = basis.members;
    this.memberCoefficient = new Float64Array(basis.members.length / 3);
    for (let m = 0; m < basis.count; m++) {
      const f = coefficients[m]! * basis.weight[m]!;
      for (let j = basis.start[m]!; j < basis.start[m + 1]!; j++) this.memberCoefficient[j] = f;
    }
  }

  /** ε(k), k cartesian Å⁻¹. */
  value(k: Vec3): number {
    const r = this.members;
    const c = this.memberCoefficient;
    let e = 0;
    for (let j = 0; j < c.length; j++) e += c[j]! * Math.cos(k[0] * r[3 * j]! + k[1] * r[3 * j + 1]! + k[2] * r[3 * j + 2]!);
    return e;
  }

  /** ε, ∇ε and the Hessian at cartesian k. */
  derivatives(k: Vec3): BandDerivatives {
    const r = this.members;
    const c = this.memberCoefficient;
    let e = 0;
    let gx = 0,
      gy = 0,
      gz = 0;
    let hxx = 0,
      hxy = 0,
      hxz = 0,
      hyy = 0,
      hyz = 0,
      hzz = 0;
    for (let j = 0; j < c.length; j++) {
      const x = r[3 * j]!;
      const y = r[3 * j + 1]!;
      const z = r[3 * j + 2]!;
      const phase = k[0] * x + k[1] * y + k[2] * z;
      const cs = c[j]! * Math.cos(phase);
      const sn = c[j]! * Math.sin(phase);
      e += cs;
      gx -= x * sn;
      gy -= y * sn;
      gz -= z * sn;
      hxx -= x * x * cs;
      hxy -= x * y * cs;
      hxz -= x * z * cs;
      hyy -= y * y * cs;
      hyz -= y * z * cs;
      hzz -= z * z * cs;
    }
    return {
      value: e,
      gradient: [gx, gy, gz],
      hessian: [
        [hxx, hxy, hxz],
        [hxy, hyy, hyz],
        [hxz, hyz, hzz],
      ],
    };
  }
}
