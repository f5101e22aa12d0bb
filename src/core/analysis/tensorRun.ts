/**
 * Masses from a tensor run (read by tensorRunRead.ts: two shells h and 2h around the centre, and along every
 * line through it the central-4 second derivative, error O(h⁴)); a grid around a degenerate edge: gridWarping.ts.
 *
 * One band at the centre: the six tensor components by least squares over the lines (uᵀHu = E''(u)).
 * Several bands (a degenerate edge): each branch (bands sorted by energy at each point) along each line,
 * masses listed along [100], [110], [111]; in a cubic crystal the warped-band fit (warpedBands.ts) and each
 * branch's density-of-states mass by angular integration of the form that fits the bands (three bands: the
 * L, M, N form; two or four: the warped form), else from the 26 directions of the lines.
 */
import type { BandStructure, Mat3, MassFit, Vec3 } from '../model';
import { kpointAt } from '../model';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import type { CrystalSymmetry } from '../lattice/symmetry';
import { displacementOperations } from '../lattice/tensorKpoints';
import { cartesianOperation } from './symmetryTensor';
import { leastSquares } from './fits/leastSquares';
import { principalMasses } from './tensorFit';
import { multiBandDosMass } from './averagedMasses';
import { looksLikeReducedRun, readTensorRun, type TensorRunLine } from './tensorRunRead';
import { quotable, warpedFromPoints, warpingNote, warpingReport, type OffPathMasses, type WarpingReport } from './gridWarping';
import { cubicAxesAreCartesian, threefoldDosMasses, threefoldFromDirections } from './warpedBands';

/** Method id of the two-shell line derivative (the 5-point central difference). */
export const TWO_SHELL_METHOD = 'central-4';

/**
 * Weights of the 26-point spherical rule on the ⟨100⟩ (6), ⟨110⟩ (12) and ⟨111⟩ (8) directions, exact for
 * polynomials of degree 7 on the sphere (V. I. Lebedev's octahedral rules; weights 1/21, 4/105, 9/280 per
 * point, memory; the tests check the exactness on monomials).
 */
export const SPHERE_26_WEIGHTS = { axial: 1 / 21, face: 4 / 105, body: 9 / 280 };

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
