/**
 * A form factor V(|G|²) from the values tabulated at the cubic shells (materials.ts).
 *
 * At the shells of the unstrained crystal this returns the tabulated number exactly (zero at a shell the
 * table does not list). Under strain a shell splits and moves slightly; there the value is continued
 * linearly from the nearest tabulated shell (within ±0.5 (2π/a)²) with a slope from the neighbouring table
 * entries (monotone piecewise-cubic slopes, Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238 (1980)), and the
 * caller scales it by Ω₀/Ω for the change of cell volume. This continuation is our own modelling choice for
 * the invented strain demo, not part of Cohen & Bergstresser's paper, and it is not fitted to deformation
 * potentials. For silicon it gives a Δ-valley shear deformation potential Ξ_u ≈ 10.4 eV (published 8.6–9.3 eV,
 * memory), so valley splittings under (001) biaxial strain are of the right sign and size; but the volume
 * deformation potential of the indirect gap comes out near −4 eV where measurements give about +1.5 eV
 * (memory): the hydrostatic part of any strain moves the gap the wrong way in this model.
 */

const SHELLS = [3, 4, 8, 11];
const REACH = 0.5;

export type FormFactorTable = Record<number, number>;

/** V at q² (units of (2π/a₀)²). */
export function formFactorAt(table: FormFactorTable, q2: number): number {
  let shell = -1;
  for (const s of SHELLS) if (Math.abs(q2 - s) <= REACH) shell = s;
  if (shell < 0) return 0;
  const v = table[shell];
  if (v === undefined) return 0;
  const dq = q2 - shell;
  if (dq === 0) return v;
  return v + tableSlope(table, shell) * dq;
}

/** dV/dq² at a tabulated shell: one-sided at the ends, the harmonic mean of the secants inside. */
export function tableSlope(table: FormFactorTable, shell: number): number {
  const nodes = Object.keys(table)
    .map(Number)
    .sort((a, b) => a - b);
  const i = nodes.indexOf(shell);
  if (i < 0 || nodes.length < 2) return 0;
  const secant = (a: number, b: number): number => (table[nodes[b]!]! - table[nodes[a]!]!) / (nodes[b]! - nodes[a]!);
  if (i === 0) return secant(0, 1);
  if (i === nodes.length - 1) return secant(i - 1, i);
  const s1 = secant(i - 1, i);
  const s2 = secant(i, i + 1);
  if (s1 * s2 <= 0) return 0;
  return (2 * s1 * s2) / (s1 + s2);
}
