/**
 * Planning a tensor run from an analysed band structure: where to centre it (the extremum refined between
 * sampled points along the path's lines through it), how far the shells go (h chosen so the band moves a set
 * energy at h, from the lightest mass measured), and which points (lattice/tensorKpoints.ts).
 */
import type { BandStructure, ExtremumReport, Vec3 } from '../model';
import { HBAR2_OVER_ME_EV_A2 } from '../units';
import { cartesianToFractional } from '../lattice/reciprocal';
import { displacementOperations, planTensorRun, stepForEnergy, type TensorRunPlan } from '../lattice/tensorKpoints';
import { leastSquares } from './fits/leastSquares';
import { engineContext } from './engineContext';
import { kIndexOf } from './kIndex';
import { oppositeRay } from './pathRays';

/** Default energy the band moves at the first shell, eV. */
export const DEFAULT_SHELL_ENERGY_EV = 0.01;

export interface RefinedCentre {
  /** Fractional reciprocal coordinates. */
  k: Vec3;
  /** Cartesian shift from the sampled point, Å⁻¹. */
  shift: number;
  how: string;
}

/**
 * The extremum between sampled points: along every straight line of the path through the sampled point,
 * a quartic through the five nearest points (two each side; a parabola through three when one side has only
 * one), its stationary point found by Newton's method from the parabola's vertex. Shifts of the lines are
 * combined by least squares (a small ridge term keeps unsampled directions at zero). The sampled point when
 * no line moves it by more than 1e-6 Å⁻¹ or a vertex falls outside the points used.
 */
export function refinedCentre(bs: BandStructure, e: ExtremumReport): RefinedCentre {
  const idx = kIndexOf(bs, e.k);
  const none: RefinedCentre = { k: e.k, shift: 0, how: 'the sampled point' };
  if (idx === null || !bs.lattice) return none;
  const net = engineContext(bs).network;
  if (!net || !net.geometry.cartesian) return none;
  const rays = net.raysFrom(idx);
  const en = bs.energies[e.spin]!;
  const nb = bs.nBands;
  const band = e.band - 1;
  const lines: { u: Vec3; delta: number }[] = [];
  const done = new Set<number>();
  rays.forEach((r, i) => {
    if (done.has(i)) return;
    const o = oppositeRay(rays, r);
    if (!o) return;
    done.add(i);
    done.add(rays.indexOf(o));
    const t: number[] = [];
    const y: number[] = [];
    for (let m = Math.min(2, o.indices.length - 1); m >= 1; m--) {
      t.push(-o.t[m]!);
      y.push(en[o.indices[m]! * nb + band]!);
    }
    for (let m = 0; m <= Math.min(2, r.indices.length - 1); m++) {
      t.push(r.t[m]!);
      y.push(en[r.indices[m]! * nb + band]!);
    }
    if (t.length < 3) return;
    const p = t.length >= 5 ? 4 : 2;
    const a = new Float64Array(t.length * (p + 1));
    const scale = Math.max(...t.map(Math.abs));
    t.forEach((x, j) => {
      for (let c = 0; c <= p; c++) a[j * (p + 1) + c] = (x / scale) ** c;
    });
    const fit = leastSquares(a, Float64Array.from(y), t.length, p + 1);
    if (!fit) return;
    const c = fit.coef;
    if (!(Math.abs(c[2]!) > 0)) return;
    let s = -c[1]! / (2 * c[2]!);
    for (let it = 0; it < 30 && p === 4; it++) {
      const d1 = c[1]! + 2 * c[2]! * s + 3 * c[3]! * s * s + 4 * c[4]! * s ** 3;
      const d2 = 2 * c[2]! + 6 * c[3]! * s + 12 * c[4]! * s * s;
      if (!(Math.abs(d2) > 0)) break;
      const ds = d1 / d2;
      s -= ds;
      if (Math.abs(ds) < 1e-13) break;
    }
    const delta = s * scale;
    const inner = Math.min(r.t[1] ?? 0, o.t[1] ?? 0);
    if (!(Math.abs(delta) < inner)) return;
    lines.push({ u: r.direction, delta });
  });
  const moving = lines.filter((l) => Math.abs(l.delta) > 1e-6);
  if (!moving.length) return none;
  // Ridge least squares for the shift vector s: u_l · s = δ_l.
  const m = [
    [1e-9, 0, 0],
    [0, 1e-9, 0],
    [0, 0, 1e-9],
  ];
  const rhs = [0, 0, 0];
  for (const l of lines) {
    for (let i = 0; i < 3; i++) {
      rhs[i] = rhs[i]! + l.u[i]! * l.delta;
      for (let j = 0; j < 3; j++) m[i]![j] = m[i]![j]! + l.u[i]! * l.u[j]!;
    }
  }
  const shift = solve3(m, rhs);
  const f = cartesianToFractional(shift as Vec3, bs.lattice);
  const k: Vec3 = [e.k[0] + f[0], e.k[1] + f[1], e.k[2] + f[2]];
  return {
    k,
    shift: Math.hypot(...shift),
    how: `refined between sampled points along ${moving.length} line${moving.length === 1 ? '' : 's'} of the path (quartic through five points), ${Math.hypot(...shift).toFixed(5)} Å⁻¹ from the sampled point`,
  };
}

function solve3(m: number[][], b: number[]): number[] {
  const a = m.map((r, i) => [...r, b[i]!]);
  for (let c = 0; c < 3; c++) {
    let p = c;
    for (let i = c + 1; i < 3; i++) if (Math.abs(a[i]![c]!) > Math.abs(a[p]![c]!)) p = i;
    [a[c], a[p]] = [a[p]!, a[c]!];
    for (let i = 0; i < 3; i++) {
      if (i === c) continue;
      const f = a[i]![c]! / a[c]![c]!;
      for (let j = c; j < 4; j++) a[i]![j] = a[i]![j]! - f * a[c]![j]!;
    }
  }
  return [a[0]![3]! / a[0]![0]!, a[1]![3]! / a[1]![1]!, a[2]![3]! / a[2]![2]!];
}

export interface StepChoice {
  step: number;
  how: string;
}

/**
 * The shell distance: so the lightest mass measured at the extremum (directional masses, or the principal
 * masses of its tensor) moves by `energy_eV` at h. Null when no mass is known.
 */
export function stepFromMasses(e: ExtremumReport, energy_eV: number): StepChoice | null {
  const ms = [...e.masses.map((m) => m.mass), ...(e.tensor ? e.tensor.principal : [])].filter((m) => Number.isFinite(m) && m !== 0);
  if (!ms.length) return null;
  const light = Math.min(...ms.map(Math.abs));
  const step = stepForEnergy(light, energy_eV, HBAR2_OVER_ME_EV_A2);
  const partial =
    !e.tensor && e.degenerateBands === 1
      ? ` (only ${e.masses.length} direction${e.masses.length === 1 ? ' was' : 's were'} measured here and no tensor: a lighter unmeasured direction moves more, so a smaller --energy or --step is safer for a strongly anisotropic valley)`
      : '';
  return {
    step,
    how: `h = ${step.toPrecision(3)} Å⁻¹: the lightest mass measured here (${light.toPrecision(3)} m_e) moves ${(energy_eV * 1000).toPrecision(3)} meV at h${partial}`,
  };
}

export interface PlanOptions {
  /** Energy the band moves at h, eV (default 10 meV). */
  energy_eV?: number;
  /** Fixed step, Å⁻¹ (overrides the energy rule). */
  step?: number;
}

export interface PlannedRun {
  plan: TensorRunPlan;
  centre: RefinedCentre;
  stepHow: string;
}

/** The plan for the extremum `e` of `bs`: refined centre, step, little-group reduction. */
export function planForExtremum(bs: BandStructure, e: ExtremumReport, opts: PlanOptions = {}): PlannedRun {
  if (!bs.lattice) throw new RangeError('no lattice: a tensor run in Å⁻¹ cannot be placed');
  const centre = refinedCentre(bs, e);
  let step: number;
  let stepHow: string;
  if (opts.step !== undefined) {
    step = opts.step;
    stepHow = `h = ${step} Å⁻¹ as given`;
  } else {
    const c = stepFromMasses(e, opts.energy_eV ?? DEFAULT_SHELL_ENERGY_EV);
    if (!c) throw new RangeError('no mass was measured at this extremum, so the step cannot be chosen from it: give --step');
    step = c.step;
    stepHow = c.how;
  }
  const sym = engineContext(bs).symmetry.sym;
  const ops = sym ? displacementOperations(sym.reciprocalPointGroup, centre.k, 2e-5) : null;
  return { plan: planTensorRun(centre.k, step, bs.lattice, ops, e.degenerateBands > 1), centre, stepHow };
}

/** The plan around an arbitrary fractional k (no extremum analysed there): a step must be given. */
export function planAtK(bs: BandStructure, k: Vec3, step: number, bodyDiagonals: boolean): TensorRunPlan {
  if (!bs.lattice) throw new RangeError('no lattice: a tensor run in Å⁻¹ cannot be placed');
  const sym = engineContext(bs).symmetry.sym;
  const ops = sym ? displacementOperations(sym.reciprocalPointGroup, k, 2e-5) : null;
  return planTensorRun(k, step, bs.lattice, ops, bodyDiagonals);
}
