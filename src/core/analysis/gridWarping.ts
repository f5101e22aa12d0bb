/**
 * Warped-band masses off the path: the fit of the Dresselhaus–Kip–Kittel form to points around a degenerate
 * extremum (warpedBands.ts) turned into report entries, and its use on a grid around such an extremum.
 */
import type { BandStructure, MassFit, MassTensor, Vec3, WarpingFitReport } from '../model';
import { kpointAt } from '../model';
import type { CrystalSymmetry } from '../lattice/symmetry';
import { cartesianDisplacement, displacementOperations } from '../lattice/tensorKpoints';
import { cartesianOperation } from './symmetryTensor';
import {
  cubicAnisotropy,
  cubicAxesAreCartesian,
  fitWarpedBands,
  heavyLightMasses,
  warpedDosMass,
  WARPING_UNIT,
  type WarpedFit,
} from './warpedBands';

export type WarpingReport = WarpingFitReport;

export interface OffPathMasses {
  masses: MassFit[];
  tensor: MassTensor | null;
  warping: WarpingReport | null;
  dosMass: number | null;
  warnings: string[];
}

export function warpingReport(f: WarpedFit): WarpingReport {
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
export function quotable(m: Omit<MassFit, 'determined'>, reason: string | null): MassFit {
  const why =
    reason ?? (m.stderr > 0.3 * Math.abs(m.mass) ? `standard error ${m.stderr.toPrecision(2)} m_e is more than 30 % of |m|` : null);
  return why ? { ...m, determined: false, undeterminedReason: why } : { ...m, determined: true };
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
