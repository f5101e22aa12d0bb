/**
 * One band as a sum of star functions, ε(k) = Σ_m c_m S_m(k), with its analytic gradient and Hessian
 * (cartesian, eV·Å and eV·Å²): ∂/∂k cos(k·R) = −R sin(k·R), ∂²/∂k∂k cos(k·R) = −R Rᵀ cos(k·R).
 *
 * With R = Σ_a n_a a_a the phase is Σ_a n_a θ_a, θ_a = k·a_a, read from three short tables of exp(i n θ_a).
 * The members are regrouped in lines of equal (n_0, n_1) (memberLines): along a line only n_2 changes, so the
 * sums Σ c e^{i n_2 θ_2} (and with n_2, n_2²) are taken first and multiplied once by e^{i(n_0 θ_0 + n_1 θ_1)}.
 * Derivatives are summed in lattice coordinates and turned cartesian at the end (∂θ_a/∂k = a_a).
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
  /** Its `value` must equal value(k) to the bit (the refinement uses either). */
  derivatives(k: Vec3): BandDerivatives;
}

export class StarInterpolant implements SmoothBand {
  /**
   * c_m times the star's weight, per member in line order (the star's value repeated for each of its members):
   * the sums read it in order instead of through lines.star, about twice as fast.
   */
  private readonly memberCoefficient: Float64Array;
  private readonly lines: MemberLines;
  /** cos and sin of n θ_a for n in −reach..reach, axis a's table starting at a·(2·reach + 1). */
  private readonly tableCos: Float64Array;
  private readonly tableSin: Float64Array;

  /**
   * `memberBuffer`: where to keep the per-member coefficients (the basis's member count long), for an
   * interpolant used briefly and then dropped (leave-one-out refits): one buffer then serves them all, and
   * an interpolant made with it is valid only until the next one made with the same buffer.
   */
  constructor(
    readonly basis: StarBasis,
    readonly coefficients: Float64Array,
    memberBuffer?: Float64Array,
  ) {
    const lines = memberLines(basis);
    this.lines = lines;
    const star = lines.star;
    this.memberCoefficient = memberCoefficients(
      coefficients,
      basis.weight,
      star,
      memberBuffer?.length === star.length ? memberBuffer : new Float64Array(star.length),
    );
    this.tableCos = new Float64Array(3 * (2 * lines.reach + 1));
    this.tableSin = new Float64Array(3 * (2 * lines.reach + 1));
  }

  /**
   * The last few energies computed, by exact k: the analysis asks again for the energy where it has just had
   * the derivatives (a band's value at another band's extremum, the energy at the extremum found), and the
   * same number is returned without the sum.
   */
  private readonly memoK = new Float64Array(3 * MEMO);
  private readonly memoE = new Float64Array(MEMO);
  private memoCount = 0;

  private recalled(k: Vec3): number | null {
    const n = Math.min(this.memoCount, MEMO);
    const mk = this.memoK;
    for (let i = 0; i < n; i++) if (mk[3 * i] === k[0] && mk[3 * i + 1] === k[1] && mk[3 * i + 2] === k[2]) return this.memoE[i]!;
    return null;
  }

  private remember(k: Vec3, e: number): number {
    const i = this.memoCount++ % MEMO;
    this.memoK[3 * i] = k[0];
    this.memoK[3 * i + 1] = k[1];
    this.memoK[3 * i + 2] = k[2];
    this.memoE[i] = e;
    return e;
  }

  /** Fills the phase tables at cartesian k. */
  private tables(k: Vec3): void {
    const { tableCos, tableSin } = this;
    const reach = this.lines.reach;
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
    const known = this.recalled(k);
    if (known !== null) return known;
    this.tables(k);
    return this.remember(k, lineValueSum(this.lines, this.memberCoefficient, this.tableCos, this.tableSin));
  }

  /** ε, ∇ε and the Hessian at cartesian k. */
  derivatives(k: Vec3): BandDerivatives {
    this.tables(k);
    const t = lineDerivativeSums(this.lines, this.memberCoefficient, this.tableCos, this.tableSin, SUMS);
    this.remember(k, t[0]!);
    // Cartesian: ∇_k = Σ_a a_a ∂/∂θ_a; Hessian Aᵀ H_θ A with the lattice rows A.
    const a = this.basis.lattice;
    const gt = [t[1]!, t[2]!, t[3]!];
    const ht = [
      [t[4]!, t[5]!, t[6]!],
      [t[5]!, t[7]!, t[8]!],
      [t[6]!, t[8]!, t[9]!],
    ];
    const gradient = [0, 1, 2].map((x) => a[0][x]! * gt[0]! + a[1][x]! * gt[1]! + a[2][x]! * gt[2]!) as Vec3;
    const hessian = [0, 1, 2].map((x) =>
      [0, 1, 2].map((y) => {
        let acc = 0;
        for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) acc += a[p]![x]! * ht[p]![q]! * a[q]![y]!;
        return acc;
      }),
    ) as Mat3;
    return { value: t[0]!, gradient, hessian };
  }
}

// The sums over the members are functions of their own, with nothing after their loops: the runtime optimises
// them while the loop runs (on-stack replacement), and code after the loop that had not yet run would send
// that optimised code back to the interpreter on every call (measured: once per derivatives call, before).

/** ε = Σ c cos φ over the members, by lines. */
function lineValueSum(lines: MemberLines, c: Float64Array, tc: Float64Array, ts: Float64Array): number {
  const { start, at2 } = lines;
  let e = 0;
  for (let l = 0; l + 1 < start.length; l++) {
    let ar = 0;
    let ai = 0;
    const end = start[l + 1]!;
    for (let p = start[l]!; p < end; p++) {
      const i2 = at2[p]!;
      const w = c[p]!;
      ar += w * tc[i2]!;
      ai += w * ts[i2]!;
    }
    e += lineTerm(lines, l, tc, ts, ar, ai);
  }
  return e;
}

/** Re[e^{i(n_0 θ_0 + n_1 θ_1)} (ar + i ai)] for line l. */
function lineTerm(lines: MemberLines, l: number, tc: Float64Array, ts: Float64Array, ar: number, ai: number): number {
  const i0 = lines.at0[l]!;
  const i1 = lines.at1[l]!;
  const pr = tc[i0]! * tc[i1]! - ts[i0]! * ts[i1]!;
  const pi = tc[i0]! * ts[i1]! + ts[i0]! * tc[i1]!;
  return pr * ar - pi * ai;
}

/** c_m times the star's weight for each member (stars[p] its star), into `out`: the product once per star. */
function memberCoefficients(c: Float64Array, weight: Float64Array, stars: Int32Array, out: Float64Array): Float64Array {
  if (perStar.length < c.length) perStar = new Float64Array(c.length);
  const product = perStar;
  for (let m = 0; m < c.length; m++) product[m] = c[m]! * weight[m]!;
  for (let p = 0; p < stars.length; p++) out[p] = product[stars[p]!]!;
  return out;
}

/** Scratch for memberCoefficients (grown as needed). */
let perStar = new Float64Array(0);

/** Energies remembered per interpolant (StarInterpolant.recalled). */
const MEMO = 4;

/** Scratch for the ten sums of lineDerivativeSums (read at once by the caller). */
const SUMS = new Float64Array(10);

/** ε, then ∂ε/∂θ_0..2, then ∂²ε/∂θ∂θ as 00, 01, 02, 11, 12, 22, into `out`. */
function lineDerivativeSums(lines: MemberLines, c: Float64Array, tc: Float64Array, ts: Float64Array, out: Float64Array): Float64Array {
  const { start, at0, at1, at2, n0, n1, n2 } = lines;
  // The ten sums are kept in `out` itself, line by line: nothing is left to do after the loop (see above).
  out.fill(0);
  for (let l = 0; l + 1 < start.length; l++) {
    // A = Σ c e^{i n2 θ2}, B = Σ c n2 e^{i n2 θ2}, C = Σ c n2² e^{i n2 θ2} along the line.
    let ar = 0,
      ai = 0,
      br = 0,
      bi = 0,
      cr = 0,
      ci = 0;
    const end = start[l + 1]!;
    for (let p = start[l]!; p < end; p++) {
      const i2 = at2[p]!;
      const w = c[p]!;
      const x = w * tc[i2]!;
      const y = w * ts[i2]!;
      const m = n2[p]!;
      ar += x;
      ai += y;
      br += m * x;
      bi += m * y;
      cr += m * m * x;
      ci += m * m * y;
    }
    const i0 = at0[l]!;
    const i1 = at1[l]!;
    const pr = tc[i0]! * tc[i1]! - ts[i0]! * ts[i1]!;
    const pi = tc[i0]! * ts[i1]! + ts[i0]! * tc[i1]!;
    // Σ c cos φ and Σ c sin φ with their n2 and n2² weights, φ the whole phase.
    const cosA = pr * ar - pi * ai;
    const sinA = pr * ai + pi * ar;
    const cosB = pr * br - pi * bi;
    const sinB = pr * bi + pi * br;
    const cosC = pr * cr - pi * ci;
    const m0 = n0[l]!;
    const m1 = n1[l]!;
    out[0] = out[0]! + cosA;
    out[1] = out[1]! - m0 * sinA;
    out[2] = out[2]! - m1 * sinA;
    out[3] = out[3]! - sinB;
    out[4] = out[4]! - m0 * m0 * cosA;
    out[5] = out[5]! - m0 * m1 * cosA;
    out[6] = out[6]! - m0 * cosB;
    out[7] = out[7]! - m1 * m1 * cosA;
    out[8] = out[8]! - m1 * cosB;
    out[9] = out[9]! - cosC;
  }
  return out;
}

/**
 * The members of a basis in lines: R and −R give the same terms (cos is even, and the gradient and Hessian
 * terms are even in R too), so each member is taken with its first nonzero coordinate positive; those with
 * the same (n_0, n_1) form a line, lines in order of (n_0, n_1). Made once per basis.
 */
interface MemberLines {
  /** Largest |n_a| of any member. */
  reach: number;
  /** Line l holds positions start[l] .. start[l+1]−1; its n_0, n_1 and their places in the phase tables. */
  start: Int32Array;
  n0: Float64Array;
  n1: Float64Array;
  at0: Int32Array;
  at1: Int32Array;
  /** Per position: n_2, its place in the phase table, and the star the member belongs to. */
  n2: Float64Array;
  at2: Int32Array;
  star: Int32Array;
}

const layouts = new WeakMap<StarBasis, MemberLines>();

function memberLines(basis: StarBasis): MemberLines {
  const hit = layouts.get(basis);
  if (hit) return hit;
  const z = basis.integer;
  const count = z.length / 3;
  let reach = 0;
  for (let j = 0; j < z.length; j++) reach = Math.max(reach, Math.abs(z[j]!));
  const width = 2 * reach + 1;
  // Lines are buckets of (n_0, n_1), n_0 in 0..reach after the flip: a counting sort, members of a line in
  // basis order.
  const buckets = (reach + 1) * width;
  const bucketOf = new Int32Array(count);
  const third = new Int32Array(count);
  const star = new Int32Array(count);
  const from = new Int32Array(buckets + 1);
  for (let m = 0; m < basis.count; m++) {
    for (let j = basis.start[m]!; j < basis.start[m + 1]!; j++) {
      const a = z[3 * j]!;
      const b = z[3 * j + 1]!;
      const c = z[3 * j + 2]!;
      const flip = a < 0 || (a === 0 && (b < 0 || (b === 0 && c < 0))) ? -1 : 1;
      bucketOf[j] = flip * a * width + flip * b + reach;
      third[j] = flip * c;
      star[j] = m;
      from[bucketOf[j]! + 1]!++;
    }
  }
  for (let q = 0; q < buckets; q++) from[q + 1] = from[q + 1]! + from[q]!;
  const fill = from.slice(0, buckets);
  const out = { n2: new Float64Array(count), at2: new Int32Array(count), star: new Int32Array(count) };
  for (let j = 0; j < count; j++) {
    const p = fill[bucketOf[j]!]!++;
    out.n2[p] = third[j]!;
    out.at2[p] = third[j]! + 2 * width + reach;
    out.star[p] = star[j]!;
  }
  let lineCount = 0;
  for (let q = 0; q < buckets; q++) if (from[q + 1]! > from[q]!) lineCount++;
  const lines: MemberLines = {
    reach,
    start: new Int32Array(lineCount + 1),
    n0: new Float64Array(lineCount),
    n1: new Float64Array(lineCount),
    at0: new Int32Array(lineCount),
    at1: new Int32Array(lineCount),
    ...out,
  };
  for (let q = 0, l = 0; q < buckets; q++) {
    if (from[q + 1]! === from[q]!) continue;
    const a = Math.floor(q / width);
    const b = (q % width) - reach;
    lines.start[l] = from[q]!;
    lines.n0[l] = a;
    lines.n1[l] = b;
    lines.at0[l] = a + reach;
    lines.at1[l] = b + width + reach;
    l++;
  }
  lines.start[lineCount] = count;
  layouts.set(basis, lines);
  return lines;
}
