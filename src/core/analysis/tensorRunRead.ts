/**
 * Reading a tensor run back (the points tensor-kpoints plans: lattice/tensorKpoints.ts): the written points
 * expanded by the little group of the centre (with time reversal), the two shells (h and 2h) recognised, and
 * along every line through the centre the central differences at h and 2h and their Richardson combination
 * (central-4:  E'' ≈ [−E(2h) + 16E(h) − 30E(0) + 16E(−h) − E(−2h)] / (12h²), the 5-point formula of any
 * numerical-analysis text, e.g. Abramowitz & Stegun 25.3.24).
 */
import type { BandStructure, Vec3 } from '../model';
import { kpointAt } from '../model';
import type { CrystalSymmetry } from '../lattice/symmetry';
import { cartesianDisplacement, displacementOperations, tensorRunDirections } from '../lattice/tensorKpoints';
import { cartesianOperation } from './symmetryTensor';

export interface Point {
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
export function looksLikeReducedRun(bs: BandStructure, center: number): boolean {
  const k0 = kpointAt(bs, center);
  const r: number[] = [];
  for (let j = 0; j < bs.nk; j++) if (j !== center) r.push(Math.hypot(...cartesianDisplacement(kpointAt(bs, j), k0, bs.lattice!)));
  r.sort((a, b) => a - b);
  if (r.length < 4 || !(r[0]! > 0)) return false;
  const h = r[0]!;
  const at = (t: number): number => r.filter((x) => Math.abs(x - t) < 1e-3 * h).length;
  return at(h) >= 2 && at(2 * h) >= 2 && at(h) + at(2 * h) === r.filter((x) => x < 2.5 * h).length;
}
