/**
 * Local extrema of one band on the full mesh (each mesh point compared with its 26 neighbours, periodic), one
 * start per irreducible point: the starting points of the Newton refinement.
 */
import type { RegularMesh } from './regularMesh';
import type { StationaryKind } from './newtonExtremum';

/** Fractional k of mesh point j (each component in [0, 1)). */
export function meshPoint(mesh: RegularMesh, j: number): [number, number, number] {
  const [n1, n2, n3] = mesh.divisions;
  const j3 = j % n3;
  const j2 = Math.floor(j / n3) % n2;
  const j1 = Math.floor(j / (n2 * n3));
  return [(j1 + mesh.shift[0]) / n1, (j2 + mesh.shift[1]) / n2, (j3 + mesh.shift[2]) / n3];
}

/**
 * The inverse of meshPoint: the index of the mesh point at fractional k (any periodic image), or −1 when a
 * component lies `tolerance` or farther (a fraction of one mesh step) from the mesh.
 */
export function meshIndexAt(mesh: RegularMesh, kFrac: ArrayLike<number>, tolerance: number, offset = 0): number {
  let j = 0;
  for (let a = 0; a < 3; a++) {
    const n = mesh.divisions[a]!;
    const y = kFrac[offset + a]! * n - mesh.shift[a]!;
    const i = Math.round(y);
    if (!(Math.abs(y - i) < tolerance)) return -1;
    j = j * n + (((i % n) + n) % n);
  }
  return j;
}

/**
 * Mesh points (one per irreducible point) whose energy is not above (min) / not below (max) any of their
 * 26 neighbours. `energies`: the band at the irreducible points.
 */
export function meshLocalExtrema(mesh: RegularMesh, energies: ArrayLike<number>, kind: StationaryKind): number[] {
  const [n1, n2, n3] = mesh.divisions;
  const sign = kind === 'min' ? 1 : -1;
  // The band over the whole mesh (signed so that a minimum is sought), and per axis the wrapped neighbours.
  const full = new Float64Array(mesh.total);
  for (let q = 0; q < mesh.total; q++) full[q] = sign * energies[mesh.irreducibleOf[q]!]!;
  const around = (n: number, scale: number): Int32Array => {
    const out = new Int32Array(3 * n);
    for (let j = 0; j < n; j++) for (let d = -1; d <= 1; d++) out[3 * j + d + 1] = ((((j + d) % n) + n) % n) * scale;
    return out;
  };
  const w1 = around(n1, n2 * n3);
  const w2 = around(n2, n3);
  const w3 = around(n3, 1);
  const starts: number[] = [];
  const seen = new Uint8Array(mesh.starSize.length);
  for (let j1 = 0; j1 < n1; j1++) {
    for (let j2 = 0; j2 < n2; j2++) {
      for (let j3 = 0; j3 < n3; j3++) {
        const j = (j1 * n2 + j2) * n3 + j3;
        const irr = mesh.irreducibleOf[j]!;
        if (seen[irr] || !noNeighbourBelow(full, j, w1, 3 * j1, w2, 3 * j2, w3, 3 * j3)) continue;
        seen[irr] = 1;
        starts.push(j);
      }
    }
  }
  return starts;
}

/** True when no point of the 3 × 3 × 3 block around mesh point j (w1..w3: the wrapped neighbours per axis) is below it. */
function noNeighbourBelow(
  full: Float64Array,
  j: number,
  w1: Int32Array,
  o1: number,
  w2: Int32Array,
  o2: number,
  w3: Int32Array,
  o3: number,
): boolean {
  const e0 = full[j]!;
  for (let a = 0; a < 3; a++) {
    for (let b = 0; b < 3; b++) {
      const row = w1[o1 + a]! + w2[o2 + b]!;
      for (let c = 0; c < 3; c++) if (full[row + w3[o3 + c]!]! < e0) return false;
    }
  }
  return true;
}

/** True when every one of the 26 neighbours of mesh point j is strictly above (min) / below (max) it. */
export function isStrictMeshExtremum(mesh: RegularMesh, energies: ArrayLike<number>, j: number, kind: StationaryKind): boolean {
  const [n1, n2, n3] = mesh.divisions;
  const j3 = j % n3;
  const j2 = Math.floor(j / n3) % n2;
  const j1 = Math.floor(j / (n2 * n3));
  const sign = kind === 'min' ? 1 : -1;
  const e0 = sign * energies[mesh.irreducibleOf[j]!]!;
  for (let a = -1; a <= 1; a++) {
    for (let b = -1; b <= 1; b++) {
      for (let c = -1; c <= 1; c++) {
        if (!(a || b || c)) continue;
        const q = (((((j1 + a) % n1) + n1) % n1) * n2 + ((((j2 + b) % n2) + n2) % n2)) * n3 + ((((j3 + c) % n3) + n3) % n3);
        if (!(sign * energies[mesh.irreducibleOf[q]!]! > e0)) return false;
      }
    }
  }
  return true;
}
