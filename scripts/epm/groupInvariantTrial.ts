/**
 * A trial, measured by meshMassSurvey.ts and NOT used by the analysis: a band recovered from the invariants of an
 * isolated group of bands. For a group of consecutive bands isolated over the whole mesh from the bands below and
 * above, the elementary symmetric functions c_1 = Σ x_i, c_2 = Σ_{i<j} x_i x_j, … of the group's energies
 * (x = (E − μ)/σ, shifted by the group's middle and scaled by its half range) are the coefficients of the
 * characteristic polynomial p(x; k) = Π (x − x_i) = Σ_j (−1)^j c_j x^{n−j} of the Hamiltonian restricted to the
 * group, analytic in k wherever the group is isolated (Kato's perturbation theory of an isolated eigenvalue
 * group; common practice in k·p). Each c_j is interpolated with the run's star fit; the band is the (b − first)-th
 * real root (the real root nearest the band's by-index interpolant where the interpolated polynomial has complex
 * roots), its gradient and Hessian by implicit differentiation of p(x(k), k) = 0: ∇x = −∇p / p_x and
 * H_x = −(H_k p + p_xx ∇x ∇xᵀ + ∇p_x ∇xᵀ + ∇x ∇p_xᵀ) / p_x (checked against finite differences).
 *
 * Measured (EPM, Cohen & Bergstresser 1966): Si and Ge have no isolated group holding the conduction band (bands
 * 5–8 touch each other and band 9); GaAs 12³ Γ with group 2–5 (band 1 lies 4 eV below, band 6 at least 0.2 eV
 * above): m* 0.092 vs 0.072 (+27 %, plain interpolation +14 %), and its leave-one-out loses the extremum; at 16³
 * the group's band error near Γ is twice plain interpolation's. The invariants interpolate no better than the
 * band: their products carry the valence bands' warping and band 6's near approach.
 */
import type { Mat3, Vec3 } from '../../src/core/model';
import type { BandDerivatives, SmoothBand } from '../../src/core/interpolation/starInterpolant';

/** Makes the interpolant of values at the data points, without data point `leftOut` when it is given. */
export type SmoothFitter = (values: Float64Array, leftOut: number | null) => SmoothBand;

/** The elementary symmetric functions c_1..c_n of the group's scaled energies at each data point. */
export function groupInvariantValues(bands: readonly ArrayLike<number>[], group: BandGroup, mu: number, sigma: number): Float64Array[] {
  const n = group.last - group.first + 1;
  const points = bands[group.first]!.length;
  const c = Array.from({ length: n }, () => new Float64Array(points));
  const e = new Float64Array(n + 1);
  for (let i = 0; i < points; i++) {
    // e_j of the first m values, built up one value at a time: e_j ← e_j + x·e_{j−1}.
    e.fill(0);
    e[0] = 1;
    for (let m = 0; m < n; m++) {
      const x = (bands[group.first + m]![i]! - mu) / sigma;
      for (let j = m + 1; j >= 1; j--) e[j] = e[j]! + x * e[j - 1]!;
    }
    for (let j = 1; j <= n; j++) c[j - 1]![i] = e[j]!;
  }
  return c;
}

/** The group's mean energy and its spread (half the range of its energies, at least 1 eV·1e-3). */
export function groupScale(bands: readonly ArrayLike<number>[], group: BandGroup): { mu: number; sigma: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (let b = group.first; b <= group.last; b++) {
    for (let i = 0; i < bands[b]!.length; i++) {
      lo = Math.min(lo, bands[b]![i]!);
      hi = Math.max(hi, bands[b]![i]!);
    }
  }
  return { mu: (lo + hi) / 2, sigma: Math.max(1e-3, (hi - lo) / 2) };
}

/**
 * The ascending real roots of the monic polynomial Σ_j a_j x^{n−j} (a_0 = 1, highest power first): between
 * consecutive real roots of p′ (found the same way, down to degree 1) p is monotone, so each interval holds at
 * most one root, found by safeguarded Newton steps inside its bracket. Outside all roots: Cauchy's bound.
 */
export function realRoots(a: readonly number[]): number[] {
  const n = a.length - 1;
  if (n < 1) return [];
  if (n === 1) return [-a[1]! / a[0]!];
  const bound = 1 + Math.max(...a.slice(1).map((v) => Math.abs(v / a[0]!)));
  const derivative = a.slice(0, n).map((v, j) => (v * (n - j)) / n);
  const ends = [-bound, ...realRoots(derivative).filter((x) => x > -bound && x < bound), bound];
  const roots: number[] = [];
  for (let i = 0; i + 1 < ends.length; i++) {
    let lo = ends[i]!;
    let hi = ends[i + 1]!;
    let flo = evaluate(a, lo)[0];
    const fhi = evaluate(a, hi)[0];
    if (flo === 0) {
      if (!roots.length || roots[roots.length - 1] !== lo) roots.push(lo);
      continue;
    }
    if (flo * fhi > 0) continue;
    let x = 0.5 * (lo + hi);
    for (let it = 0; it < 100; it++) {
      const [p, dp] = evaluate(a, x);
      if (p === 0) break;
      if (p * flo > 0) [lo, flo] = [x, p];
      else hi = x;
      const newton = x - p / dp;
      const next = newton > lo && newton < hi ? newton : 0.5 * (lo + hi);
      if (Math.abs(next - x) <= 1e-15 * Math.max(1, Math.abs(x))) {
        x = next;
        break;
      }
      x = next;
    }
    roots.push(x);
  }
  return roots;
}

/** Monic coefficients of Π (x − x_i) from the elementary symmetric functions c_1..c_n: a_j = (−1)^j c_j. */
export function monicFromInvariants(c: ArrayLike<number>): number[] {
  return [1, ...Array.from({ length: c.length }, (_, j) => (j % 2 === 0 ? -1 : 1) * c[j]!)];
}

/** p(x) and p′(x) by Horner's rule, coefficients a_0..a_n (highest power first). */
function evaluate(a: readonly number[], x: number): [number, number] {
  let p = 0;
  let dp = 0;
  for (const coefficient of a) {
    dp = dp * x + p;
    p = p * x + coefficient;
  }
  return [p, dp];
}

/**
 * Band b (0-based, inside the group) from the group's interpolated invariants. Its root is the (b − first)-th
 * real root in ascending order when all n are real; where the interpolated polynomial has complex roots (two
 * members of the group nearly degenerate, a little interpolation error splits them off the real line), the
 * real root nearest the band's own interpolation by index (`guide`), when given.
 */
export class GroupInvariantBand implements SmoothBand {
  private readonly invariants: SmoothBand[];
  private readonly mu: number;
  private readonly sigma: number;

  constructor(
    readonly group: BandGroup,
    readonly band: number,
    bands: readonly ArrayLike<number>[],
    fitter: SmoothFitter,
    leftOut: number | null = null,
    private readonly guide: SmoothBand | null = null,
  ) {
    const { mu, sigma } = groupScale(bands, group);
    this.mu = mu;
    this.sigma = sigma;
    this.invariants = groupInvariantValues(bands, group, mu, sigma).map((v) => fitter(v, leftOut));
  }

  /** The band's root (scaled) of the polynomial with invariants c at k, or NaN. */
  private root(c: readonly number[], k: Vec3): number {
    const roots = realRoots(monicFromInvariants(c));
    if (roots.length === c.length) return roots[this.band - this.group.first]!;
    if (!this.guide || !roots.length) return NaN;
    const near = (this.guide.value(k) - this.mu) / this.sigma;
    return roots.reduce((best, x) => (Math.abs(x - near) < Math.abs(best - near) ? x : best));
  }

  value(k: Vec3): number {
    return (
      this.mu +
      this.sigma *
        this.root(
          this.invariants.map((f) => f.value(k)),
          k,
        )
    );
  }

  derivatives(k: Vec3): BandDerivatives {
    const d = this.invariants.map((f) => f.derivatives(k));
    const n = d.length;
    const x = this.root(
      d.map((v) => v.value),
      k,
    );
    // p = Σ_{j=0..n} s_j c_j x^{n−j}, s_j = (−1)^j, c_0 = 1 (constant in k).
    let px = 0;
    let pxx = 0;
    const gp = [0, 0, 0];
    const gpx = [0, 0, 0];
    const hp = [
      [0, 0, 0],
      [0, 0, 0],
      [0, 0, 0],
    ];
    for (let j = 0; j <= n; j++) {
      const s = j % 2 === 0 ? 1 : -1;
      const power = n - j;
      const cj = j === 0 ? 1 : d[j - 1]!.value;
      if (power >= 1) px += s * cj * power * x ** (power - 1);
      if (power >= 2) pxx += s * cj * power * (power - 1) * x ** (power - 2);
      if (j === 0) continue;
      const dj = d[j - 1]!;
      for (let a = 0; a < 3; a++) {
        gp[a]! += s * dj.gradient[a]! * x ** power;
        if (power >= 1) gpx[a]! += s * dj.gradient[a]! * power * x ** (power - 1);
        for (let b = 0; b < 3; b++) hp[a]![b]! += s * dj.hessian[a]![b]! * x ** power;
      }
    }
    // A double root (p_x = 0) has no derivatives of its own: NaN, as where the root is missing.
    const gx = gp.map((v) => -v / px);
    const hx = [0, 1, 2].map((a) => [0, 1, 2].map((b) => -(hp[a]![b]! + pxx * gx[a]! * gx[b]! + gpx[a]! * gx[b]! + gx[a]! * gpx[b]!) / px));
    return {
      value: this.mu + this.sigma * x,
      gradient: gx.map((v) => this.sigma * v) as Vec3,
      hessian: hx.map((row) => row.map((v) => this.sigma * v)) as Mat3,
    };
  }
}
/** A group of consecutive bands, 0-based, inclusive. */
export interface BandGroup {
  first: number;
  last: number;
}

/**
 * The smallest separation over all points between band b and band b + 1 (eV): `bands[b][i]` are the energies
 * at point i. Infinity past the last band.
 */
export function smallestSeparation(bands: readonly ArrayLike<number>[], b: number): number {
  const lower = bands[b];
  const upper = bands[b + 1];
  if (!lower || !upper) return Infinity;
  let gap = Infinity;
  for (let i = 0; i < lower.length; i++) gap = Math.min(gap, upper[i]! - lower[i]!);
  return gap;
}

/**
 * The partition of bands into the smallest isolated groups: a boundary lies between b and b + 1 wherever their
 * smallest separation over the points is larger than `margin_eV`. Groups in order, covering every band.
 */
export function isolatedGroups(bands: readonly ArrayLike<number>[], margin_eV: number): BandGroup[] {
  const groups: BandGroup[] = [];
  let first = 0;
  for (let b = 0; b < bands.length; b++) {
    if (b === bands.length - 1 || smallestSeparation(bands, b) > margin_eV) {
      groups.push({ first, last: b });
      first = b + 1;
    }
  }
  return groups;
}

/**
 * The candidate groups for band b, smallest first: the isolated group holding it, that group joined with the
 * isolated group just below, just above, and both, each at most `maxSize` bands, never the band alone (that is
 * the interpolation by index). A group touching the first or last band given is isolated only on its open
 * side when the bands beyond are not given: it is kept only when it starts at band 0 (nothing lies below the
 * lowest band) or ends before the last band given.
 */
export function candidateGroups(groups: readonly BandGroup[], b: number, nBands: number, maxSize: number): BandGroup[] {
  const at = groups.findIndex((g) => g.first <= b && b <= g.last);
  if (at < 0) return [];
  const spans: [number, number][] = [
    [at, at],
    [at - 1, at],
    [at, at + 1],
    [at - 1, at + 1],
  ];
  const out: BandGroup[] = [];
  for (const [i, j] of spans) {
    const lo = groups[i];
    const hi = groups[j];
    if (!lo || !hi) continue;
    const g = { first: lo.first, last: hi.last };
    const size = g.last - g.first + 1;
    // The last band given may have neighbours above that were not given: not known to be isolated.
    if (size < 2 || size > maxSize || g.last === nBands - 1) continue;
    if (!out.some((x) => x.first === g.first && x.last === g.last)) out.push(g);
  }
  return out;
}
