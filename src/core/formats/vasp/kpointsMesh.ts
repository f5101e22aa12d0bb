/**
 * The mesh a VASP KPOINTS file asks for in its automatic forms (VASP's documented layout: line 2 is 0, line 3
 * starts with G (Γ-centred), M (Monkhorst–Pack) or A (fully automatic, line 4 a length R_k), line 4 the
 * divisions, line 5 an optional shift in units of the mesh spacing). Pure text in, mesh description out; the
 * line-mode reader (kpoints.ts) is separate. The mesh is stated as divisions n and a shift s per axis in the
 * convention k = (j + s)/n of interpolation/regularMesh.ts, so the two can be compared.
 */
import type { DeclaredMesh, Mat3 } from '../../model';

export interface RequestedMesh {
  centring: 'gamma' | 'monkhorst-pack';
  divisions: [number, number, number];
  /** Per axis, in units of the spacing, reduced to [0, 1): what the mesh points are offset from Γ by. */
  shift: [number, number, number];
}

export type KpointsMeshHeader =
  { kind: 'mesh'; mesh: RequestedMesh } | { kind: 'auto-length'; length: number } | { kind: 'not-a-mesh'; reason: string };

const MAX_DIVISIONS = 1000;

function numbers(line: string | undefined): number[] {
  if (line === undefined) return [];
  return line
    .trim()
    .split(/\s+/)
    .filter((x) => x.length > 0)
    .slice(0, 3)
    .map(Number);
}

export function readKpointsMeshHeader(text: string): KpointsMeshHeader {
  const lines = text.split(/\r?\n/, 6);
  const count = Number((lines[1] ?? '').trim().split(/\s+/)[0]);
  if (!Number.isInteger(count) || count !== 0)
    return { kind: 'not-a-mesh', reason: 'Line 2 of the KPOINTS file is not 0: the file lists k-points or a path, not an automatic mesh.' };
  const mode = (lines[2] ?? '').trim().charAt(0).toLowerCase();
  if (mode === 'a') {
    const length = numbers(lines[3])[0];
    if (length === undefined || !Number.isFinite(length) || length <= 0 || length > 1e4) {
      return { kind: 'not-a-mesh', reason: 'The fully automatic KPOINTS file gives no positive length on line 4.' };
    }
    return { kind: 'auto-length', length };
  }
  if (mode !== 'g' && mode !== 'm')
    return {
      kind: 'not-a-mesh',
      reason: `Line 3 of the KPOINTS file ("${(lines[2] ?? '').trim().slice(0, 40)}") names no mesh kind this reads (Gamma, Monkhorst-Pack, Auto).`,
    };
  const n = numbers(lines[3]);
  if (!plausibleDivisions(n)) {
    return {
      kind: 'not-a-mesh',
      reason: `Line 4 of the KPOINTS file does not give three whole numbers of divisions between 1 and ${MAX_DIVISIONS}.`,
    };
  }
  const extra = numbers(lines[4]);
  const user = extra.length === 3 && extra.every(Number.isFinite) ? extra : [0, 0, 0];
  return { kind: 'mesh', mesh: requestedMesh(mode === 'g' ? 'gamma' : 'monkhorst-pack', n, user) };
}

/** A mesh from VASP's centring, divisions and user shift (units of the spacing), in the convention above. */
export function requestedMesh(centring: RequestedMesh['centring'], n: [number, number, number], user: readonly number[]): RequestedMesh {
  // Monkhorst–Pack: k = (j + ½)/n − ½ per axis, i.e. offset ½ from Γ for even n, none for odd n.
  const shift = n.map((ni, a) => {
    const s = (centring === 'monkhorst-pack' && ni % 2 === 0 ? 0.5 : 0) + user[a]!;
    return s - Math.floor(s);
  }) as [number, number, number];
  return { centring, divisions: [...n], shift };
}

/** Divisions a declared mesh may have: whole numbers from 1 to MAX_DIVISIONS (hostile input is only compared). */
export function plausibleDivisions(n: readonly number[]): n is [number, number, number] {
  return n.length === 3 && n.every((x) => Number.isInteger(x) && x >= 1 && x <= MAX_DIVISIONS);
}

/**
 * The divisions of a fully automatic mesh: n_i = max(1, ⌊R_k |b_i| + ½⌋) with |b_i| the reciprocal vector
 * length without the 2π (VASP's documented rule), Γ-centred.
 */
export function automaticDivisions(length: number, lattice: Mat3): [number, number, number] {
  const [a1, a2, a3] = lattice;
  const cross = (u: readonly number[], v: readonly number[]): number[] => [
    u[1]! * v[2]! - u[2]! * v[1]!,
    u[2]! * v[0]! - u[0]! * v[2]!,
    u[0]! * v[1]! - u[1]! * v[0]!,
  ];
  const vol = a1[0] * (a2[1] * a3[2] - a2[2] * a3[1]) - a1[1] * (a2[0] * a3[2] - a2[2] * a3[0]) + a1[2] * (a2[0] * a3[1] - a2[1] * a3[0]);
  return [cross(a2, a3), cross(a3, a1), cross(a1, a2)].map((c) =>
    Math.max(1, Math.floor((length * Math.hypot(c[0]!, c[1]!, c[2]!)) / Math.abs(vol) + 0.5)),
  ) as [number, number, number];
}

/**
 * The mesh a KPOINTS file declares, in the form the analysis checks against the points (null when it declares
 * none: a path, a list, or a header this does not read). `lattice` (Å) turns a fully automatic length into
 * divisions; without it that form declares nothing stated here.
 */
export function declaredMeshOfKpoints(bytes: Uint8Array, lattice: Mat3 | null, fileName: string): DeclaredMesh | null {
  const h = readKpointsMeshHeader(new TextDecoder().decode(bytes.subarray(0, 4096)));
  if (h.kind === 'mesh') {
    const kind = h.mesh.centring === 'gamma' ? 'Γ-centred' : 'Monkhorst–Pack';
    return { divisions: [...h.mesh.divisions], shift: [...h.mesh.shift], source: `${fileName} (${kind})` };
  }
  if (h.kind === 'auto-length' && lattice) {
    return {
      divisions: automaticDivisions(h.length, lattice),
      shift: [0, 0, 0],
      source: `${fileName} (fully automatic, length ${h.length})`,
    };
  }
  return null;
}
