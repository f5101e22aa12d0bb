/**
 * Following the branches of a degenerate band edge along a ray. Band indices order states by energy, so
 * where two branches cross, "band n" jumps from one to the other and its curvature is meaningless. Here
 * each branch is continued smoothly instead: at every step, the branches' next energies are predicted by
 * quadratic extrapolation and matched to the available bands (the degenerate ones and their neighbours
 * above and below) by the assignment with the smallest total mismatch.
 */

/** Largest group handled by exhaustive assignment. */
export const MAX_BRANCHES = 6;

export interface BranchTrace {
  /** Energies per branch along the ray, eV; branch order = band order at the first step. */
  energies: Float64Array[];
  /** For each branch, the band (0-based) it was found in at each step. */
  bands: Int32Array[];
  /** True when some branch left its band index (a crossing was followed). */
  crossed: boolean;
}

function extrapolate(t: Float64Array, e: Float64Array, m: number): number {
  // Lagrange extrapolation to t[m] through the previous (up to) three points.
  const k = Math.min(3, m);
  let sum = 0;
  for (let a = m - k; a < m; a++) {
    let w = 1;
    for (let b = m - k; b < m; b++) if (b !== a) w *= (t[m]! - t[b]!) / (t[a]! - t[b]!);
    sum += w * e[a]!;
  }
  return sum;
}

export function followBranches(
  energyAt: (k: number, band: number) => number,
  nBands: number,
  indices: Int32Array,
  t: Float64Array,
  group: number[],
): BranchTrace {
  const g = group.length;
  const n = indices.length;
  const energies = group.map(() => new Float64Array(n));
  const bands = group.map(() => new Int32Array(n));
  const lo = Math.max(0, Math.min(...group) - 1);
  const hi = Math.min(nBands - 1, Math.max(...group) + 1);
  const candidates: number[] = [];
  for (let b = lo; b <= hi; b++) candidates.push(b);
  let crossed = false;
  for (let m = 0; m < n; m++) {
    const k = indices[m]!;
    if (m <= 1 || g > MAX_BRANCHES) {
      group.forEach((b, j) => {
        energies[j]![m] = energyAt(k, b);
        bands[j]![m] = b;
      });
      continue;
    }
    const pred = energies.map((e) => extrapolate(t, e, m));
    const avail = candidates.map((b) => energyAt(k, b));
    let best = Infinity;
    let bestPick: number[] = [];
    const pick: number[] = [];
    const used = new Uint8Array(candidates.length);
    const search = (j: number, cost: number): void => {
      if (cost >= best) return;
      if (j === g) {
        best = cost;
        bestPick = [...pick];
        return;
      }
      for (let c = 0; c < candidates.length; c++) {
        if (used[c]) continue;
        used[c] = 1;
        pick.push(c);
        search(j + 1, cost + Math.abs(avail[c]! - pred[j]!));
        pick.pop();
        used[c] = 0;
      }
    };
    search(0, 0);
    bestPick.forEach((c, j) => {
      energies[j]![m] = avail[c]!;
      bands[j]![m] = candidates[c]!;
      if (candidates[c] !== group[j]) crossed = true;
    });
  }
  return { energies, bands, crossed };
}
