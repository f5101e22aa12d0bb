/**
 * The curvature of a band at a point P where it is even along a line (P fixed by inversion modulo G: time
 * reversal gives E(P + q) = E(−k) = E(P − q) when 2P is a reciprocal lattice vector), from the band's energies
 * at the mesh points of that line: a least-squares polynomial in q² (q the distance from P), the fewest points
 * nearest P that allow leaving one out. The uncertainty is the largest change of the curvature when one point
 * other than P is left out, or when the polynomial is one order higher with the next point added.
 */
import { evenPoly, fitEven } from './linePairModel';

/** Order of the polynomial in q² (E = c₀ + c₁q² + c₂q⁴: curvature and its first correction). */
export const EVEN_LINE_ORDER = 2;

export interface EvenLineCurvature {
  /** Second derivative along the line at P, eV·Å². */
  curvature: number;
  /** Largest change of the curvature, eV·Å². */
  uncertainty: number;
  /** Line points used (P included) and the order in q². */
  points: number;
  order: number;
}

/** `q` ascending from 0 (P itself), `e` the band there; null when the points are too few or a fit fails. */
export function evenLineCurvature(q: readonly number[], e: readonly number[]): EvenLineCurvature | null {
  const order = EVEN_LINE_ORDER;
  const count = order + 2;
  if (q.length < count || q[0] !== 0) return null;
  const curvatureOf = (keep: readonly number[], n: number): number | null => {
    const c = fitEven(
      keep.map((i) => q[i]!),
      keep.map((i) => e[i]!),
      n,
    );
    return c ? evenPoly(c, 0)[2] : null;
  };
  const all = Array.from({ length: count }, (_, i) => i);
  const best = curvatureOf(all, order);
  if (best === null) return null;
  const others = all.slice(1).map((drop) =>
    curvatureOf(
      all.filter((i) => i !== drop),
      order,
    ),
  );
  if (q.length > count) others.push(curvatureOf([...all, count], order + 1));
  if (others.some((x) => x === null)) return null;
  const uncertainty = Math.max(...others.map((x) => Math.abs(x! - best)));
  return { curvature: best, uncertainty, points: count, order };
}
