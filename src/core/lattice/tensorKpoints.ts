/**
 * The k-points of a tensor run: a follow-up calculation at points around an extremum whose energies give the
 * full mass tensor (and, at a degenerate edge, every branch and the warped-band fit).
 *
 * Geometry: the centre and two shells, at distance h and 2h, along a fixed set of cartesian line directions
 * through it — the three axes, the six face diagonals and (for degenerate edges, or when asked) the four body
 * diagonals, both ways. Along each line the five energies give the second derivative as a Richardson
 * combination of the central differences at h and 2h (error O(h⁴) instead of O(h²)), so the curvature is
 * separated from the quartic terms; the axes and face diagonals fix the six components of the tensor
 * (common practice for a symmetric matrix from directional second derivatives).
 *
 * Only points not related by the little group of the centre (with time reversal) need computing: the
 * planner writes one representative per orbit, and the analysis expands them back (tensorRun.ts).
 */
import type { Mat3, Vec3 } from '../model';
import { cartesianToFractional, reciprocalLattice } from './reciprocal';

/** Line directions (cartesian unit vectors), each with its opposite: 6 axial, 12 face-diagonal, 8 body-diagonal. */
export function tensorRunDirections(bodyDiagonals: boolean): Vec3[] {
  const out: Vec3[] = [];
  for (let x = -1; x <= 1; x++) {
    for (let y = -1; y <= 1; y++) {
      for (let z = -1; z <= 1; z++) {
        const nz = (x !== 0 ? 1 : 0) + (y !== 0 ? 1 : 0) + (z !== 0 ? 1 : 0);
        if (nz === 0 || (nz === 3 && !bodyDiagonals)) continue;
        const n = Math.sqrt(nz);
        out.push([x / n, y / n, z / n]);
      }
    }
  }
  return out;
}

/**
 * An operation of the little group of the centre, acting on displacements from it in fractional reciprocal
 * coordinates: `sign` +1 when R maps the centre to itself (modulo G), −1 when to minus itself (then time
 * reversal brings it back: E(k0 − R d) = E(k0 + d)).
 */
export interface DisplacementOperation {
  r: Mat3;
  sign: 1 | -1;
}

const apply = (op: DisplacementOperation, d: Vec3): Vec3 => [
  op.sign * (op.r[0][0] * d[0] + op.r[0][1] * d[1] + op.r[0][2] * d[2]),
  op.sign * (op.r[1][0] * d[0] + op.r[1][1] * d[1] + op.r[1][2] * d[2]),
  op.sign * (op.r[2][0] * d[0] + op.r[2][1] * d[1] + op.r[2][2] * d[2]),
];

/**
 * The little group of k0 (with time reversal) as displacement operations, from the fractional reciprocal
 * point group. Only operations that map k0 to ±k0 exactly, without a reciprocal-lattice translation, are
 * used: E(k0 + R d) = E(k0 + d) then follows from the point group and time reversal alone, and does not
 * lean on E(k + G) = E(k), which band data keep only to their precision (a fixed plane-wave set, or k
 * written with few digits). At a zone-boundary point such as L this writes both sides of the lines that
 * only a translation would relate, so the differences there are genuinely centred.
 */
export function displacementOperations(reciprocalOps: Mat3[], k0: Vec3, tol = 1e-5): DisplacementOperation[] {
  const same = (a: Vec3, b: Vec3): boolean => a.every((x, i) => Math.abs(x - b[i]!) < tol);
  const out: DisplacementOperation[] = [];
  for (const r of reciprocalOps) {
    const q = apply({ r, sign: 1 }, k0);
    if (same(q, k0)) out.push({ r, sign: 1 });
    if (same(q, [-k0[0], -k0[1], -k0[2]])) out.push({ r, sign: -1 });
  }
  return out;
}

/** Images of a fractional displacement under the operations, duplicates removed (the displacement first). */
export function displacementOrbit(d: Vec3, ops: DisplacementOperation[], tol = 1e-9): Vec3[] {
  const out: Vec3[] = [d];
  for (const op of ops) {
    const v = apply(op, d);
    if (!out.some((w) => Math.abs(w[0] - v[0]) + Math.abs(w[1] - v[1]) + Math.abs(w[2] - v[2]) < tol)) out.push(v);
  }
  return out;
}

export interface TensorRunPlan {
  /** Fractional reciprocal coordinates of the centre. */
  center: Vec3;
  /** Shell distance h, Å⁻¹ (the second shell is at 2h). */
  step: number;
  /** Every point of the two shells and the centre, fractional, centre first. */
  allPoints: Vec3[];
  /** The points to compute: one per orbit of the little group (all of them when no symmetry was given). */
  points: Vec3[];
  /** How many points each written point stands for. */
  multiplicity: number[];
  bodyDiagonals: boolean;
  /** Operations of the little group used (0: none given). */
  operations: number;
}

/**
 * Plan the points around fractional `center` with shell distance `step` (Å⁻¹). `ops`: the little group of
 * the centre as displacement operations (displacementOperations), or null to write every point.
 */
export function planTensorRun(
  center: Vec3,
  step: number,
  lattice: Mat3,
  ops: DisplacementOperation[] | null,
  bodyDiagonals: boolean,
): TensorRunPlan {
  if (!(step > 0) || !Number.isFinite(step)) throw new RangeError(`the tensor-run step must be a positive number of Å⁻¹, got ${step}`);
  const disp: Vec3[] = [[0, 0, 0]];
  for (const t of [step, 2 * step]) {
    for (const u of tensorRunDirections(bodyDiagonals)) disp.push(cartesianToFractional([u[0] * t, u[1] * t, u[2] * t], lattice));
  }
  const covered = new Uint8Array(disp.length);
  const reps: Vec3[] = [];
  const mult: number[] = [];
  const near = (a: Vec3, b: Vec3): boolean => Math.abs(a[0] - b[0]) + Math.abs(a[1] - b[1]) + Math.abs(a[2] - b[2]) < 1e-9;
  disp.forEach((d, i) => {
    if (covered[i]) return;
    const orbit = ops && ops.length ? displacementOrbit(d, ops) : [d];
    let n = 0;
    disp.forEach((e, j) => {
      if (!covered[j] && orbit.some((o) => near(o, e))) {
        covered[j] = 1;
        n++;
      }
    });
    reps.push(d);
    mult.push(Math.max(n, 1));
  });
  const at = (d: Vec3): Vec3 => [center[0] + d[0], center[1] + d[1], center[2] + d[2]];
  return {
    center,
    step,
    allPoints: disp.map(at),
    points: reps.map(at),
    multiplicity: mult,
    bodyDiagonals,
    operations: ops ? ops.length : 0,
  };
}

/** Shell distance (Å⁻¹) at which a band of signed mass m (m_e) moves by `energy_eV`: ħ²h²/(2|m|m_e) = ΔE. */
export function stepForEnergy(mass: number, energy_eV: number, hbar2OverMe: number): number {
  return Math.sqrt((2 * Math.abs(mass) * energy_eV) / hbar2OverMe);
}

/** The k-point input layouts a plan can be written in. */
export type KpointLayout = 'vasp' | 'qe' | 'castep' | 'list';

/** The layout matching the format a band structure was read from. */
export function kpointLayoutFor(format: string): KpointLayout {
  if (format.startsWith('vasp')) return 'vasp';
  if (format.startsWith('qe')) return 'qe';
  if (format.startsWith('castep')) return 'castep';
  return 'list';
}

export const KPOINT_FILE_NAMES: Record<KpointLayout, string> = {
  vasp: 'KPOINTS',
  qe: 'k_points.in',
  castep: 'spectral_kpoints.cell',
  list: 'tensor_kpoints.txt',
};

/** What the run is for: a non-self-consistent run (weights 1), or a hybrid-functional run (zero weights after the mesh). */
export type TensorRunKind = 'nscf' | 'hybrid';

export interface WeightedMesh {
  /** Fractional k of the self-consistent mesh (irreducible points) and their weights as written. */
  k: Vec3[];
  w: number[];
}

const num = (x: number): string => (Object.is(x, -0) || Math.abs(x) < 5e-13 ? 0 : x).toFixed(10).padStart(15);
const wnum = (x: number): string => (Number.isInteger(x) ? String(x) : x.toPrecision(10));

/**
 * The plan as text. `kind` 'hybrid' writes the mesh first with its weights and the plan's points after it
 * with weight zero (VASP's layout for band energies of a hybrid-functional run); 'nscf' writes the points
 * with weight 1. Quantum ESPRESSO and CASTEP inputs are written for a non-self-consistent (or spectral) run.
 */
export function writeTensorKpoints(
  plan: TensorRunPlan,
  layout: KpointLayout,
  what: string,
  kind: TensorRunKind,
  mesh: WeightedMesh | null = null,
): string {
  const pts = plan.points;
  const n = pts.length;
  const sym = plan.operations
    ? `, ${n} of ${plan.allPoints.length} points (the rest follow by the ${plan.operations} operations of the little group)`
    : `, ${n} points`;
  const about = `tensor-run k-points around ${what}: shells at ${plan.step.toPrecision(4)} and ${(2 * plan.step).toPrecision(4)} 1/Angstrom${sym} (Valleyscope)`;
  switch (layout) {
    case 'vasp': {
      const rows: string[] = [];
      if (kind === 'hybrid' && mesh) mesh.k.forEach((k, i) => rows.push(`${num(k[0])}${num(k[1])}${num(k[2])}  ${wnum(mesh.w[i]!)}`));
      for (const k of pts) rows.push(`${num(k[0])}${num(k[1])}${num(k[2])}  ${kind === 'hybrid' ? 0 : 1}`);
      return [about, String(rows.length), 'Reciprocal', ...rows, ''].join('\n');
    }
    case 'qe':
      return [`! ${about}`, 'K_POINTS crystal', String(n), ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}  1.0`), ''].join('\n');
    case 'castep':
      return [
        `! ${about}`,
        '%BLOCK SPECTRAL_KPOINT_LIST',
        ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}  ${(1 / n).toFixed(10)}`),
        '%ENDBLOCK SPECTRAL_KPOINT_LIST',
        '',
      ].join('\n');
    case 'list':
      return [
        `# ${about}`,
        '# fractional reciprocal coordinates k1 k2 k3',
        ...pts.map((k) => `${num(k[0])}${num(k[1])}${num(k[2])}`),
        '',
      ].join('\n');
  }
}

/** Cartesian displacement (Å⁻¹) of fractional `k` from fractional `k0`, nearest periodic image. */
export function cartesianDisplacement(k: Vec3, k0: Vec3, lattice: Mat3): Vec3 {
  const rec = reciprocalLattice(lattice);
  const f = [0, 1, 2].map((c) => {
    const v = k[c]! - k0[c]!;
    return v - Math.round(v);
  });
  return [0, 1, 2].map((j) => f[0]! * rec[0][j]! + f[1]! * rec[1][j]! + f[2]! * rec[2][j]!) as Vec3;
}
