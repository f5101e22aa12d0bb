/**
 * The roughness weight of a star in the smoothness-constrained interpolation: the fit minimises
 * Σ_m ρ(R_m) |c_m|² over the star coefficients c_m, with (Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721
 * (1988), eq. 2.9, their usual coefficients c1 = c2 = 3/4)
 *     ρ(R) = (1 − c1 (R/R_min)²)² + c2 (R/R_min)⁶,
 * R_min the shortest nonzero lattice vector. Long lattice vectors (rapid oscillation in k) cost more.
 */
export const ROUGHNESS_C1 = 0.75;
export const ROUGHNESS_C2 = 0.75;

export function roughness(r: number, rMin: number, c1: number = ROUGHNESS_C1, c2: number = ROUGHNESS_C2): number {
  const x = (r / rMin) ** 2;
  return (1 - c1 * x) ** 2 + c2 * x * x * x;
}

/** 1/ρ(R_m) of every star of a basis (0 for R = 0, which the roughness leaves free); made once per basis. */
export function inverseRoughnessOf(basis: { count: number; radius: Float64Array }): Float64Array {
  let hit = inverses.get(basis);
  if (!hit) {
    hit = new Float64Array(basis.count);
    const rMin = basis.radius[1]!;
    for (let j = 1; j < basis.count; j++) hit[j] = 1 / roughness(basis.radius[j]!, rMin);
    inverses.set(basis, hit);
  }
  return hit;
}

const inverses = new WeakMap<object, Float64Array>();
