/**
 * Averaged masses from principal masses (physics.md step 9; common practice, e.g. Sze & Ng):
 *   density-of-states mass  m_dos = N_v^(2/3) (m1 m2 m3)^(1/3)
 *   conductivity mass       m_c   = 3 / (1/m1 + 1/m2 + 1/m3)
 *   several hole bands      m_dos = (Σ_i m_i^(3/2))^(2/3)
 * Masses here are carrier masses (positive); a signed tensor is made positive by the caller.
 */
import type { Vec3 } from '../model';

export function densityOfStatesMass(principal: Vec3, valleys: number): number {
  return valleys ** (2 / 3) * Math.cbrt(principal[0] * principal[1] * principal[2]);
}

export function conductivityMass(principal: Vec3): number {
  return 3 / (1 / principal[0] + 1 / principal[1] + 1 / principal[2]);
}

/** Combined density-of-states mass of bands sharing one edge (heavy, light, split-off holes). */
export function multiBandDosMass(bandMasses: number[]): number {
  return bandMasses.reduce((s, m) => s + m ** 1.5, 0) ** (2 / 3);
}

export interface AveragedMasses {
  dosMass: number | null;
  conductivityMass: number | null;
  /** How the numbers were obtained, for the report's warnings. */
  note: string;
}

/**
 * From signed principal masses (all of one sign: a true minimum or maximum) and a valley count (null when
 * unknown: the single-valley DOS mass is given and the note says so).
 */
export function averagedFromPrincipal(signed: Vec3, valleys: number | null, source: string): AveragedMasses {
  const pos = signed.every((m) => m > 0);
  const neg = signed.every((m) => m < 0);
  if (!pos && !neg) {
    return { dosMass: null, conductivityMass: null, note: `No averaged masses: the ${source} has principal masses of both signs (a saddle point, not a valley).` };
  }
  const m = signed.map(Math.abs) as Vec3;
  const nv = valleys ?? 1;
  const masses = m.map((x) => x.toPrecision(3)).join(', ');
  const nvText = valleys === null ? 'N_v unknown, so the single-valley value (N_v = 1)' : `N_v = ${valleys}`;
  return {
    dosMass: densityOfStatesMass(m, nv),
    conductivityMass: conductivityMass(m),
    note: `Averaged masses (positive ${neg ? 'hole' : 'electron'} masses) from the ${source}: principal masses ${masses} m_e, ${nvText}.`,
  };
}
