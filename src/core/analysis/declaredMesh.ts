/**
 * The mesh a run's input declares (KPOINTS, vasprun.xml's <generation>, pw.x's <monkhorst_pack>) against the
 * mesh its k-points form. They agree for a run read with its own input files; when they do not, the input file
 * beside the data most likely belongs to another run (and so may the structure beside it), which a reviewer
 * must hear. The points decide what is interpolated; the declaration is only compared.
 */
import type { BandStructure, DeclaredMesh } from '../model';
import type { MeshRefusal } from '../interpolation/meshRefusal';

const HALF = 0.5;

/** "12×12×12 (through Γ)" / "8×8×8 (offset by half a step along b1, b2, b3)". */
export function describeMesh(m: { divisions: readonly number[]; shift: readonly number[] }): string {
  const axes = m.shift.flatMap((s, i) => (Math.abs(s) > 1e-9 ? [`b${i + 1}`] : []));
  const halves = m.shift.every((s) => Math.abs(s) < 1e-9 || Math.abs(s - HALF) < 1e-9);
  const offset =
    axes.length === 0
      ? 'through Γ'
      : halves
        ? `offset by half a step along ${axes.join(', ')}`
        : `offset by (${m.shift.map((s) => s.toFixed(3)).join(', ')}) steps`;
  return `${m.divisions.join('×')} (${offset})`;
}

function same(d: DeclaredMesh, found: { divisions: readonly number[]; shift: readonly number[] }): boolean {
  const wrap = (x: number): number => x - Math.floor(x + 1e-9);
  return d.divisions.every((n, i) => n === found.divisions[i]) && d.shift.every((s, i) => Math.abs(wrap(s) - wrap(found.shift[i]!)) < 1e-6);
}

/** True when the declared mesh is the one the points form. */
export function declaredMeshAgrees(declared: DeclaredMesh, found: { divisions: readonly number[]; shift: readonly number[] }): boolean {
  return same(declared, found);
}

/** A warning when the declared mesh is not the one the points form; null when they agree or nothing is declared. */
export function declaredMeshMismatch(
  declared: DeclaredMesh | undefined,
  found: { divisions: readonly number[]; shift: readonly number[] },
): string | null {
  if (!declared || same(declared, found)) return null;
  return `${capital(declared.source)} declares the mesh ${describeMesh(declared)}, but the k-points of the eigenvalue file form the mesh ${describeMesh(found)}: the input file beside the data may belong to another run (check the structure beside it too). The k-points in the eigenvalue file were used.`;
}

/**
 * Why a run of scattered points was not interpolated as a mesh run, for the report — when a reader would expect
 * it to be: a mesh is declared, the weights differ (a mesh reduced by symmetry), or the bands broke the crystal's
 * symmetry. Null for other lists (a path written point by point, a hybrid run's zero-weight path): no noise.
 */
export function meshRunNotUsed(bs: Pick<BandStructure, 'declaredMesh' | 'weights'>, refusal: MeshRefusal): string | null {
  const declared = bs.declaredMesh;
  const w = bs.weights;
  const reduced = w !== null && w.length > 1 && w.some((x) => Math.abs(x - w[0]!) > 1e-6 * Math.abs(w[0]!) + 1e-12);
  if (!declared && !reduced && refusal.kind !== 'lower-symmetry') return null;
  const why = refusal.reason.replace(/\.$/, '');
  if (!declared) return `The k-points were not interpolated as a mesh run: ${why}. They are analysed as they are.`;
  return `${capital(declared.source)} declares the mesh ${describeMesh(declared)}, but the run was not interpolated: ${why}. The k-points are analysed as they are.`;
}

const capital = (s: string): string => s.charAt(0).toUpperCase() + s.slice(1);
