/**
 * Reading a tensor run back (the points tensor-kpoints plans: lattice/tensorKpoints.ts). The written points
 * are expanded by the little group of the centre (with time reversal), the two shells recognised, and along
 * every line through the centre the second derivative taken as the Richardson combination of the central
 * differences at h and 2h:  E'' ≈ [−E(2h) + 16E(h) − 30E(0) + 16E(−h) − E(−2h)] / (12h²)  (central-4,
 * error O(h⁴); the 5-point formula of any numerical-analysis text, e.g. Abramowitz & Stegun 25.3.24).
 *
 * One band at the centre: the six tensor components by least squares over the lines (uᵀHu = E''(u)).
 * Several bands (a degenerate edge): each branch (bands sorted by energy at each point) along each line,
 * masses listed along [100], [110], [111]; in a cubic crystal the warped-band fit (warpedBands.ts) and each
 * branch's density-of-states mass by angular integration of the form that fits the bands (three bands: the
 * L, M, N form; two or four: the warped form), else from the 26 directions of the lines.
 */
import type { BandStructure, Mat3, MassFit, MassTensor, Vec3, WarpingFitReport } from '../model';
import { kpointAt } from '../model';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import type { CrystalSymmetry } from '../lattice/symmetry';
import { cartesianDisplacement, displacementOperations, tensorRunDirections } from '../lattice/tensorKpoints';
import { cartesianOperation } from './symmetryTensor';
import { leastSquares } from './fits/leastSquares';
import { principalMasses } from './tensorFit';
import { multiBandDosMass } from './averagedMasses';
import {
  cubicAnisotropy,
  cubicAxesAreCartesian,
  fitWarpedBands,
  threefoldDosMasses,
  threefoldFromDirections,
  heavyLightMasses,
  warpedDosMass,
  WARPING_UNIT,
  type WarpedFit,
} from './warpedBands';

/** Method id of the two-shell line derivative (the 5-point central difference). */
export const TWO_SHELL_METHOD = 'central-4';

/**
 * Weights of the 26-point spherical rule on the ⟨100⟩ (6), ⟨110⟩ (12) and ⟨111⟩ (8) directions, exact for
 * polynomials of degree 7 on the sphere (V. I. Lebedev's octahedral rules; weights 1/21, 4/105, 9/280 per
 * point, memory; the tests check the exactness on monomials).
 */
export const SPHERE_26_WEIGHTS = { axial: 1 / 21, face: 4 / 105, body: 9 / 280 };

interface Point {
  d: Vec3;
  /** Energies of the group's bands, sorted descending. */
  e: Float64Array;
}

export interface TensorRunLine {
  u: Vec3;
  kind: 'axial' | 'face' | 'body';
  /** Per branch (sorted as the points): central-2 at h and 2h, and central-4, eV·Å². */
  c2h: Float64Array;
  c22h: Float64Array;
  c4: Float64Array;
  /** Energy span of the five points per branch, meV. */
  span_meV: Float64Array;
}

export interface TensorRunData {
  step: number;
  lines: TensorRunLine[];
  /** Every point after expansion (centre included). */
  points: Point[];
  written: number;
}

/** Points nearest the centre that are expanded and searched for shells (a plan writes at most 53). */
const NEAREST_POINTS = 400;

/** Matching tolerance for displacements, Å⁻¹: files write k with 7 significant digits or more (≈ 2e-7 Å⁻¹). */
const MATCH_TOL = 2e-5;

/** Points in a spatial hash with cells of MATCH_TOL: lookup within the tolerance in O(1). */
class PointSet {
  private readonly cells = new Map<string, Point[]>();
  readonly all: Point[] = [];
  private cell(d: Vec3, o: Vec3 = [0, 0, 0]): string {
    return d.map((x, i) => Math.floor(x / MATCH_TOL) + o[i]!).join(',');
  }
  find(d: Vec3): Point | undefined {
    for (let a = -1; a <= 1; a++)
      for (let b = -1; b <= 1; b++)
        for (let c = -1; c <= 1; c++) {
          for (const p of this.cells.get(this.cell(d, [a, b, c])) ?? []) {
            if (Math.abs(p.d[0] - d[0]) < MATCH_TOL && Math.abs(p.d[1] - d[1]) < MATCH_TOL && Math.abs(p.d[2] - d[2]) < MATCH_TOL) return p;
          }
        }
    return undefined;
  }
  add(p: Point): boolean {
    if (this.find(p.d)) return false;
    const k = this.cell(p.d);
    const list = this.cells.get(k);
    if (list) list.push(p);
    else this.cells.set(k, [p]);
    this.all.push(p);
    return true;
  }
}

/**
 * The expanded points and lines of a tensor run centred at k index `center`, or null when the k-points are
 * not one (no common h with both shells complete along the axes and face diagonals).
 */
export function readTensorRun(
  bs: BandStructure,
  spin: number,
  group: number[],
  center: number,
  sym: CrystalSymmetry | null,
): TensorRunData | null {
  if (!bs.lattice || bs.nk < 2) return null;
  const lattice = bs.lattice;
  const k0 = kpointAt(bs, center);
  const fracOps = sym ? displacementOperations(sym.reciprocalPointGroup, k0, 2e-5) : [];
  const ops = fracOps.map((o) => ({ r: cartesianOperation(o.r, lattice), sign: o.sign }));
  const en = bs.energies[spin]!;
  const nb = bs.nBands;
  const set = new PointSet();
  const g = group.length;
  // Only the points nearest the centre can belong to its shells (a hybrid run's mesh, or a large grid, lies
  // farther out): expanding the nearest few hundred keeps the cost independent of the size of the file.
  const near: { j: number; d: Vec3; r: number }[] = [];
  for (let j = 0; j < bs.nk; j++) {
    const d = cartesianDisplacement(kpointAt(bs, j), k0, lattice);
    near.push({ j, d, r: Math.hypot(...d) });
  }
  near.sort((x, y) => x.r - y.r);
  for (const { j, d } of near.slice(0, NEAREST_POINTS)) {
    const e = Float64Array.from(group.map((b) => en[j * nb + b]!))
      .sort()
      .reverse();
    const images: Vec3[] = [d];
    for (const op of ops) {
      const r = op.r;
      images.push([0, 1, 2].map((i) => op.sign * (r[i]![0] * d[0] + r[i]![1] * d[1] + r[i]![2] * d[2])) as Vec3);
    }
    for (const v of images) set.add({ d: v, e });
  }
  const at = (u: Vec3, t: number): Point | undefined => set.find([u[0] * t, u[1] * t, u[2] * t]);
  const origin = set.find([0, 0, 0]);
  if (!origin) return null;
  const radii = [
    ...new Set(
      set.all
        .map((p) => Math.hypot(...p.d))
        .filter((r) => r > 1e-9)
        .map((r) => Number(r.toPrecision(5))),
    ),
  ].sort((a, b) => a - b);
  const base = tensorRunDirections(false);
  const body = tensorRunDirections(true).filter((u) => u.every((x) => x !== 0));
  for (let h of radii.slice(0, 40)) {
    if (!base.every((u) => at(u, h) && at(u, 2 * h))) continue;
    const hasBody = body.every((u) => at(u, h) && at(u, 2 * h));
    // The shell distance as written (mean over the six axial points), not the rounded candidate.
    h = base.filter((u) => u.filter((x) => x !== 0).length === 1).reduce((acc, u) => acc + Math.hypot(...at(u, h)!.d), 0) / 6;
    const lines: TensorRunLine[] = [];
    const all = hasBody ? [...base, ...body] : base;
    for (const u of all) {
      // One line per ± pair: keep the direction whose first non-zero component is positive.
      const first = u.find((x) => x !== 0)!;
      if (first < 0) continue;
      const m: Vec3 = [-u[0], -u[1], -u[2]];
      const p = [at(m, 2 * h)!, at(m, h)!, origin, at(u, h)!, at(u, 2 * h)!];
      const c2h = new Float64Array(g);
      const c22h = new Float64Array(g);
      const c4 = new Float64Array(g);
      const span = new Float64Array(g);
      for (let b = 0; b < g; b++) {
        const E = p.map((x) => x.e[b]!);
        c2h[b] = (E[3]! + E[1]! - 2 * E[2]!) / (h * h);
        c22h[b] = (E[4]! + E[0]! - 2 * E[2]!) / (4 * h * h);
        c4[b] = (-E[4]! + 16 * E[3]! - 30 * E[2]! + 16 * E[1]! - E[0]!) / (12 * h * h);
        span[b] = (Math.max(...E) - Math.min(...E)) * 1000;
      }
      const nz = u.filter((x) => x !== 0).length;
      lines.push({ u, kind: nz === 1 ? 'axial' : nz === 2 ? 'face' : 'body', c2h, c22h, c4, span_meV: span });
    }
    // Points of the file on the centre or the two shells (a hybrid run's mesh points are not counted).
    const hh = h;
    const written = near.filter((p) => p.r < 1e-9 || Math.abs(p.r - hh) < 1e-3 * hh || Math.abs(p.r - 2 * hh) < 2e-3 * hh).length;
    return { step: h, lines, points: set.all.filter((p) => Math.hypot(...p.d) < 2.01 * hh), written };
  }
  return null;
}

/** Points nearest the centre at two distances r and 2r only (at least two at each), and nothing closer. */
function looksLikeReducedRun(bs: BandStructure, center: number): boolean {
  const k0 = kpointAt(bs, center);
  const r: number[] = [];
  for (let j = 0; j < bs.nk; j++) if (j !== center) r.push(Math.hypot(...cartesianDisplacement(kpointAt(bs, j), k0, bs.lattice!)));
  r.sort((a, b) => a - b);
  if (r.length < 4 || !(r[0]! > 0)) return false;
  const h = r[0]!;
  const at = (t: number): number => r.filter((x) => Math.abs(x - t) < 1e-3 * h).length;
  return at(h) >= 2 && at(2 * h) >= 2 && at(h) + at(2 * h) === r.filter((x) => x < 2.5 * h).length;
}

export type WarpingReport = WarpingFitReport;

export interface OffPathMasses {
  masses: MassFit[];
  tensor: MassTensor | null;
  warping: WarpingReport | null;
  dosMass: number | null;
  warnings: string[];
}

function warpingReport(f: WarpedFit): WarpingReport {
  const hl = heavyLightMasses(f);
  return {
    A: f.A,
    B: f.B,
    C: f.C,
    unit: WARPING_UNIT,
    stderr: f.stderr,
    points: f.points,
    residual_meV: f.residual_meV,
    heavy: { ...hl.heavy, dos: warpedDosMass(f, hl.heavyBranch) },
    light: { ...hl.light, dos: warpedDosMass(f, hl.heavyBranch === 1 ? -1 : 1) },
  };
}

/** Warped fit from points with two or more branches (sorted descending): the outer branches, or the pairs of four. */
export function warpedFromPoints(
  points: { d: Vec3; e: Float64Array }[],
  g: number,
  higherOrder: boolean,
  energySigma: number,
): WarpedFit | null {
  const n = points.length;
  const d = new Float64Array(3 * n);
  const upper = new Float64Array(n);
  const lower = new Float64Array(n);
  points.forEach((p, i) => {
    d.set(p.d, 3 * i);
    if (g === 4) {
      upper[i] = (p.e[0]! + p.e[1]!) / 2;
      lower[i] = (p.e[2]! + p.e[3]!) / 2;
    } else {
      upper[i] = p.e[0]!;
      lower[i] = p.e[g - 1]!;
    }
  });
  return fitWarpedBands({ d, upper, lower }, higherOrder, energySigma);
}

/**
 * A mass with the `determined` flag the report carries (false when its standard error exceeds 30 % of |m|, or
 * for the reason given). Typed as an intersection so it reads the same whether or not MassFit declares it yet.
 */
function quotable(m: Omit<MassFit, 'determined'>, reason: string | null): MassFit {
  const why =
    reason ?? (m.stderr > 0.3 * Math.abs(m.mass) ? `standard error ${m.stderr.toPrecision(2)} m_e is more than 30 % of |m|` : null);
  return why ? { ...m, determined: false, undeterminedReason: why } : { ...m, determined: true };
}

const dirText = (u: Vec3): string => {
  const m = Math.min(...u.filter((x) => x !== 0).map(Math.abs));
  return `[${u
    .map((x) => {
      const v = Math.round(x / m);
      return v < 0 ? `-${-v}` : String(v);
    })
    .join('')}]`;
};

/**
 * Masses from a tensor run at the extremum with k index `center` and bands `group` (0-based), or null when
 * the k-points are not a tensor run.
 */
export function tensorRunMasses(
  bs: BandStructure,
  spin: number,
  group: number[],
  center: number,
  sym: CrystalSymmetry | null,
  maximum: boolean,
  valleys: number | null,
  energySigma: number,
): OffPathMasses | null {
  const run = readTensorRun(bs, spin, group, center, sym);
  if (!run) {
    // Written with symmetry reduction and read without the structure: say so instead of fitting a fragment.
    if (!sym && bs.lattice && looksLikeReducedRun(bs, center)) {
      return {
        masses: [],
        tensor: null,
        warping: null,
        dosMass: null,
        warnings: [
          'These k-points look like a tensor run written with only its symmetry-inequivalent points (two shells, h and 2h): without the crystal structure they cannot be expanded, so no mass is given. Put the structure file (e.g. POSCAR) beside the run.',
        ],
      };
    }
    return null;
  }
  const h = run.step;
  const g = group.length;
  const warnings: string[] = [];
  const what = `tensor run: ${run.written} k-points written, ${run.points.length} after expansion by the little group of k, shells at ${h.toPrecision(3)} and ${(2 * h).toPrecision(3)} Å⁻¹`;
  if (!sym)
    warnings.push(
      'No crystal symmetry is known for this run: the points were used as written, without expansion (put the structure file beside it).',
    );
  // Rounding of the energies: σ of central-4 = σ √(1 + 256 + 900 + 256 + 1) / (12 h²).
  const sigmaC4 = (energySigma * Math.sqrt(1414)) / (12 * h * h);
  // Two shells that disagree strongly: the band is far from quadratic at this step.
  let worst = 0;
  for (const l of run.lines)
    for (let b = 0; b < g; b++) worst = Math.max(worst, Math.abs(l.c2h[b]! - l.c22h[b]!) / Math.max(Math.abs(l.c4[b]!), 1e-12));
  if (worst > 0.15)
    warnings.push(
      `The curvatures at h and 2h differ by up to ${(worst * 100).toFixed(0)} %: the band is strongly non-parabolic at this step; the extrapolated value removes the h² term only (a smaller --step would be safer).`,
    );
  const lineMass = (c: number): number => HBAR2_OVER_ME_EV_A2 / c;
  if (g === 1) {
    const n = run.lines.length;
    const a = new Float64Array(n * 6);
    const y = new Float64Array(n);
    run.lines.forEach((l, i) => {
      const [x, yy, z] = l.u;
      a.set([x * x, yy * yy, z * z, 2 * x * yy, 2 * x * z, 2 * yy * z], i * 6);
      y[i] = l.c4[0]!;
    });
    const fit = leastSquares(a, y, n, 6, sigmaC4 * sigmaC4);
    if (!fit) return null;
    const c = fit.coef;
    const hessian: Mat3 = [
      [c[0]!, c[3]!, c[4]!],
      [c[3]!, c[1]!, c[5]!],
      [c[4]!, c[5]!, c[2]!],
    ];
    const t = principalMasses(
      {
        hessian,
        hessianCov: fit.cov,
        gradient: [0, 0, 0],
        e0: run.points[0]!.e[0]!,
        rms_meV: (Math.sqrt(fit.rss / n) * h * h * 1000) / 2,
        points: run.points.length,
      },
      `${TWO_SHELL_METHOD} line curvatures, ${what}`,
    );
    // Where the extremum lies from the centre, from the odd part along the axes: δ = −g/E''.
    let off = 0;
    for (const l of run.lines.filter((x) => x.kind === 'axial')) {
      const p1 = run.points.find((p) => Math.hypot(p.d[0] - l.u[0] * h, p.d[1] - l.u[1] * h, p.d[2] - l.u[2] * h) < 1e-7);
      const m1 = run.points.find((p) => Math.hypot(p.d[0] + l.u[0] * h, p.d[1] + l.u[1] * h, p.d[2] + l.u[2] * h) < 1e-7);
      if (p1 && m1) off = Math.max(off, Math.abs((p1.e[0]! - m1.e[0]!) / (2 * h) / l.c4[0]!));
    }
    if (off > 0.5 * h)
      warnings.push(
        `The extremum lies about ${off.toFixed(4)} Å⁻¹ from the centre of the tensor run (more than half a step): plan it again centred on the refined extremum.`,
      );
    return { masses: [], tensor: t, warping: null, dosMass: null, warnings };
  }
  // Degenerate edge: every branch along [100], [110], [111] (the first line of each kind), then the warped fit.
  const masses: MassFit[] = [];
  // [100], [110], [111] themselves when present (they are, in a plan made by tensor-kpoints), else the first of each kind.
  const canonical: Record<TensorRunLine['kind'], Vec3> = { axial: [1, 0, 0], face: [1, 1, 0], body: [1, 1, 1] };
  const isCanonical = (l: TensorRunLine): boolean => {
    const c = canonical[l.kind];
    const n = Math.hypot(...c);
    return Math.abs(l.u[0] * c[0] + l.u[1] * c[1] + l.u[2] * c[2] - n) < 1e-9;
  };
  const picks = (['axial', 'face', 'body'] as const)
    .map((k) => run.lines.find((l) => l.kind === k && isCanonical(l)) ?? run.lines.find((l) => l.kind === k))
    .filter((l): l is TensorRunLine => !!l);
  for (let b = 0; b < g; b++) {
    for (const l of picks) {
      const branch = maximum ? b + 1 : g - b;
      const mass = lineMass(l.c4[b]!);
      const stderr = Math.abs(mass) * (sigmaC4 / Math.abs(l.c4[b]!));
      const shells = Math.abs(l.c2h[b]! - l.c22h[b]!) / Math.abs(l.c4[b]!);
      masses.push(
        quotable(
          {
            towards: dirText(l.u),
            direction: l.u,
            mass,
            stderr,
            points: 5,
            window_meV: l.span_meV[b]!,
            method: TWO_SHELL_METHOD,
            residual_meV: 0,
            branch,
          },
          shells > 0.5
            ? `the curvatures at h and 2h differ by ${(shells * 100).toFixed(0)} %: the band is far from quadratic at this step`
            : null,
        ),
      );
    }
  }
  masses.sort((x, y) => x.branch! - y.branch!);
  const cartOps =
    sym && bs.lattice
      ? displacementOperations(sym.reciprocalPointGroup, kpointAt(bs, center), 2e-5).map((o) => cartesianOperation(o.r, bs.lattice!))
      : [];
  const cubic = cubicAxesAreCartesian(cartOps);
  // Each branch's DOS mass: from the form that describes the bands to order k² when the crystal is cubic (three
  // bands without spin-orbit: the L, M, N form; two or four: the warped form), else from the 26 directions of
  // the lines. The 26-point rule is exact for polynomials of degree 7 only, and a heavy branch is far from one
  // (its mass peaks sharply along ⟨110⟩): on the silicon model it overestimates the heavy branch by half.
  let dosMass: number | null = null;
  const nv = valleys ?? 1;
  const nvText = `${nv > 1 ? ` × N_v^(2/3), N_v = ${nv}` : ''}`;
  const perCarrier = (per: number[]): number[] => (g === 4 && bs.spinorbit ? [per[0]!, per[2]!] : per);
  const sameSign = run.lines.every((l) => Array.from(l.c4).every((c) => (maximum ? c < 0 : c > 0)));
  if (g === 3 && cubic && sameSign) {
    const three = threefoldFromDirections(run.lines.map((l) => ({ u: l.u, inv: Array.from(l.c4).map((c) => c / HBAR2_OVER_ME_EV_A2) })));
    const dos = three ? threefoldDosMasses(three) : null;
    if (three && dos && dos.every((x) => x !== null)) {
      dosMass = nv ** (2 / 3) * multiBandDosMass(dos);
      const f = (x: number): string => x.toPrecision(3);
      warnings.push(
        `Density-of-states mass of the 3 branches, (Σ m_i^(3/2))^(2/3)${nvText}: branch masses ${dos.map(f).join(', ')} m_e by angular integration of the three-band form (Dresselhaus, Kip & Kittel 1955, no spin-orbit: H_ii = L k_i² + M (k² − k_i²), H_ij = N k_i k_j) fitted to the run's line curvatures, L = ${f(three.L)}, M = ${f(three.M)}, N = ${f(three.N)} (units ħ²/2m_e).${valleys === null ? ' N_v unknown: taken as 1.' : ''}`,
      );
    }
  }
  let warping: WarpingReport | null = null;
  if (g >= 2 && g <= 4 && cubic) {
    const f = warpedFromPoints(run.points, g, true, energySigma);
    if (f) {
      warping = warpingReport(f);
      warnings.push(...f.warnings);
      warnings.push(
        warpingNote(warping, g, `the ${run.points.length} points of the tensor run (two shells: higher-order cubic invariants fitted too)`),
      );
    }
  } else if (g >= 2) {
    warnings.push('No warped-band fit: it needs a cubic crystal whose cubic axes are the cartesian axes, and 2 to 4 degenerate bands.');
  }
  if (dosMass === null && warping && (g === 2 || g === 4) && warping.heavy.dos !== null && warping.light.dos !== null) {
    dosMass = nv ** (2 / 3) * multiBandDosMass([warping.heavy.dos, warping.light.dos]);
    warnings.push(
      `Density-of-states mass of the heavy and light branches, (Σ m_i^(3/2))^(2/3)${nvText}, from the angular integration of the warped-band fit.${valleys === null ? ' N_v unknown: taken as 1.' : ''}`,
    );
  }
  if (dosMass === null && sameSign && run.lines.some((l) => l.kind === 'body')) {
    const per: number[] = [];
    for (let b = 0; b < g; b++) {
      let s2 = 0;
      for (const l of run.lines) s2 += 2 * SPHERE_26_WEIGHTS[l.kind] * Math.abs(lineMass(l.c4[b]!)) ** 1.5;
      per.push(s2 ** (2 / 3));
    }
    const pc = perCarrier(per);
    dosMass = nv ** (2 / 3) * multiBandDosMass(pc);
    warnings.push(
      `Density-of-states mass of the ${pc.length} branches, (Σ m_i^(3/2))^(2/3)${nvText}: branch masses ${pc.map((x) => x.toPrecision(3)).join(', ')} m_e, each ⟨|m|^(3/2)⟩^(2/3) over the 26 directions of the run's lines (a spherical rule exact to degree 7 only: a strongly warped branch can be off by tens of per cent).${valleys === null ? ' N_v unknown: taken as 1.' : ''}`,
    );
  }
  return { masses, tensor: null, warping, dosMass, warnings };
}

export function warpingNote(w: WarpingReport, g: number, from: string): string {
  const f = (x: number): string => x.toPrecision(3);
  const three =
    g === 3
      ? ' Three bands without spin-orbit: the two-branch form describes the upper and lower branch only, so read its residual before quoting A, B, C.'
      : '';
  return `Warped-band fit (Dresselhaus, Kip & Kittel form) to ${from}: A = ${f(w.A)} ± ${f(w.stderr.A)}, |B| = ${f(w.B)} ± ${f(w.stderr.B)}, |C| = ${f(w.C)} ± ${f(w.stderr.C)} (units ħ²/2m_e), residual ${w.residual_meV.toFixed(2)} meV; heavy ${f(w.heavy.m100)}, ${f(w.heavy.m110)}, ${f(w.heavy.m111)} and light ${f(w.light.m100)}, ${f(w.light.m110)}, ${f(w.light.m111)} m_e along [100], [110], [111]; branch DOS masses ${w.heavy.dos === null ? 'undetermined' : f(w.heavy.dos)} (heavy) and ${w.light.dos === null ? 'undetermined' : f(w.light.dos)} (light) m_e by angular integration of the fitted form.${three}`;
}

/**
 * A grid around a degenerate extremum (not a tensor run): the warped-band fit from the nearest points, and
 * the branch masses along [100], [110], [111] from it. Null when it does not apply.
 */
export function gridWarpedMasses(
  bs: BandStructure,
  spin: number,
  group: number[],
  center: number,
  sym: CrystalSymmetry | null,
  energySigma: number,
): OffPathMasses | null {
  const g = group.length;
  if (!bs.lattice || !sym || g < 2 || g > 4) return null;
  const cartOps = displacementOperations(sym.reciprocalPointGroup, kpointAt(bs, center), 2e-5).map((o) =>
    cartesianOperation(o.r, bs.lattice!),
  );
  if (!cubicAxesAreCartesian(cartOps)) return null;
  const en = bs.energies[spin]!;
  const nb = bs.nBands;
  const k0 = kpointAt(bs, center);
  const pts = [];
  for (let j = 0; j < bs.nk; j++) {
    const d = cartesianDisplacement(kpointAt(bs, j), k0, bs.lattice);
    pts.push({
      d,
      r: Math.hypot(...d),
      e: Float64Array.from(group.map((b) => en[j * nb + b]!))
        .sort()
        .reverse(),
    });
  }
  pts.sort((a, b) => a.r - b.r);
  // The centre and the nearest shells: up to 57 points (centre + 6 + 12 + 8 + 6 + 24 on a cubic grid).
  const use = pts.slice(0, Math.min(57, pts.length));
  const f = warpedFromPoints(use, g, false, energySigma);
  if (!f) return null;
  const w = warpingReport(f);
  const masses: MassFit[] = [];
  const dirs: [string, Vec3, keyof WarpingReport['heavy']][] = [
    ['[100]', [1, 0, 0], 'm100'],
    ['[110]', [Math.SQRT1_2, Math.SQRT1_2, 0], 'm110'],
    ['[111]', [1 / Math.sqrt(3), 1 / Math.sqrt(3), 1 / Math.sqrt(3)], 'm111'],
  ];
  const span = Math.max(...use.map((p) => Math.abs(p.e[0]! - use[0]!.e[0]!))) * 1000;
  for (const [bi, which] of [
    [1, 'heavy'],
    [2, 'light'],
  ] as const) {
    for (const [name, u, m] of dirs) {
      const mass = w[which][m] as number;
      // δ(1/m)² = δA² + δs², s = √(B² + C² f): δs = √((B δB)² + (C f δC)²) / s; δm = m² δ(1/m).
      const fu = cubicAnisotropy(u);
      const sq = Math.sqrt(w.B * w.B + w.C * w.C * fu);
      const ds = sq > 0 ? Math.hypot(w.B * w.stderr.B, w.C * fu * w.stderr.C) / sq : Math.hypot(w.stderr.B, w.stderr.C);
      const stderr = mass * mass * Math.hypot(w.stderr.A, ds);
      masses.push(
        quotable(
          {
            towards: name,
            direction: u,
            mass,
            stderr,
            points: use.length,
            window_meV: span,
            method: 'warped-band fit',
            residual_meV: w.residual_meV,
            branch: bi,
          },
          null,
        ),
      );
    }
  }
  const warnings = [...f.warnings, warningsForGrid(g), warpingNote(w, g, `the ${use.length} grid points nearest the extremum`)];
  return { masses, tensor: null, warping: w, dosMass: null, warnings };
}

function warningsForGrid(g: number): string {
  return `Branch masses on this grid come from the warped-band fit (${g === 3 ? 'upper and lower of the three branches' : 'both branches'}); their errors follow from the fit's residual, not from a per-direction fit.`;
}
