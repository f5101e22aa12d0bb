/**
 * Averaged masses from principal masses (physics.md step 9; common practice, e.g. Sze & Ng):
 *   density-of-states mass  m_dos = N_v^(2/3) (m1 m2 m3)^(1/3)
 *   conductivity mass       m_c   = 3 / (1/m1 + 1/m2 + 1/m3)
 *   several hole bands      m_dos = (Σ_i m_i^(3/2))^(2/3)
 * Masses here are carrier masses (positive); a signed tensor is made positive by the caller.
 */
import type { Mat3, Vec3 } from '../model';
import { threefoldDosMasses, threefoldFromDirections, warpedDosMass, warpingFromDirections } from './warpedBands';

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
    return {
      dosMass: null,
      conductivityMass: null,
      note: `No averaged masses: the ${source} has principal masses of both signs (a saddle point, not a valley).`,
    };
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

/**
 * The star of a direction: how many distinct unit vectors the operations (cartesian, with time reversal
 * −1 added) map u onto. In a cubic crystal 6 for ⟨100⟩, 12 for ⟨110⟩, 8 for ⟨111⟩, 48 for a general one.
 */
export function directionStarSize(u: Vec3, cartesianOps: Mat3[]): number {
  const seen: Vec3[] = [];
  for (const r of cartesianOps) {
    const v: Vec3 = [
      r[0][0] * u[0] + r[0][1] * u[1] + r[0][2] * u[2],
      r[1][0] * u[0] + r[1][1] * u[1] + r[1][2] * u[2],
      r[2][0] * u[0] + r[2][1] * u[1] + r[2][2] * u[2],
    ];
    for (const w of [v, [-v[0], -v[1], -v[2]] as Vec3]) {
      if (!seen.some((s) => Math.abs(s[0] - w[0]) + Math.abs(s[1] - w[1]) + Math.abs(s[2] - w[2]) < 1e-6)) seen.push(w);
    }
  }
  return Math.max(seen.length, 1);
}

/** One directional mass of one branch at a degenerate edge (signed, m_e; cartesian unit direction). */
export interface BranchDirectionMass {
  branch: number;
  direction: Vec3;
  mass: number;
}

export interface PathLimitedDos {
  /** Each branch's density-of-states mass (positive, m_e), branch order. */
  perBranch: number[];
  /** Combined DOS mass of the branches, N_v^(2/3) (Σ m_i^(3/2))^(2/3), m_e. */
  dosMass: number;
  /** Estimated error of `dosMass`, m_e. */
  error: number;
  note: string;
}

/**
 * The density-of-states mass at a degenerate edge from path directions only. Each branch's angular average
 * ⟨|m|^(3/2)⟩ is replaced by a weighted sum over the sampled directions, each weighted by the size of its
 * star (the number of symmetry-equivalent directions it stands for: 6, 12, 8 for ⟨100⟩, ⟨110⟩, ⟨111⟩ of a
 * cubic crystal). Three directions are a coarse quadrature of a warped band, so the value is path-limited;
 * the error estimate is the difference from the angular integral of the warped form fitted to the same
 * directional masses (Dresselhaus, Kip & Kittel 1955) when the crystal is cubic and the directions determine
 * it, else from the spread of the branch's directional masses. Null when a branch has no direction or the
 * masses are not all of the extremum's sign.
 */
export function pathLimitedDosMass(
  masses: BranchDirectionMass[],
  branches: number,
  cartesianOps: Mat3[] | null,
  cubicAxes: boolean,
  valleys: number | null,
  maximum: boolean,
  /** States per branch relative to a spin-degenerate band: ½ for a spinor run's unpaired bands, else 1. */
  statesPerBranch = 1,
): PathLimitedDos | null {
  if (!masses.length || !masses.every((m) => (maximum ? m.mass < 0 : m.mass > 0))) return null;
  const perBranch: number[] = [];
  const starOf = (u: Vec3): number => (cartesianOps && cartesianOps.length ? directionStarSize(u, cartesianOps) : 1);
  let spread = 0;
  for (let b = 1; b <= branches; b++) {
    const ms = masses.filter((m) => m.branch === b);
    if (!ms.length) return null;
    let sw = 0;
    let s = 0;
    for (const m of ms) {
      const w = starOf(m.direction);
      sw += w;
      s += w * Math.abs(m.mass) ** 1.5;
    }
    const mb = (s / sw) ** (2 / 3);
    perBranch.push(mb);
    const abs = ms.map((m) => Math.abs(m.mass));
    spread = Math.max(spread, (Math.max(...abs) - Math.min(...abs)) / 2 / mb);
  }
  const nv = valleys ?? 1;
  const combine = (list: number[]): number => (statesPerBranch * nv) ** (2 / 3) * multiBandDosMass(list);
  const dosMass = combine(perBranch);
  // Cross-check with the warped form: per direction, the upper and lower branches' signed inverse masses.
  let warpedValue: number | null = null;
  if (cubicAxes && branches >= 2) {
    const dirs: Vec3[] = [];
    for (const m of masses)
      if (!dirs.some((d) => Math.abs(d[0] * m.direction[0] + d[1] * m.direction[1] + d[2] * m.direction[2]) > 1 - 1e-6))
        dirs.push(m.direction);
    const items = dirs.map((u) => {
      const inv = masses
        .filter((m) => Math.abs(m.direction[0] * u[0] + m.direction[1] * u[1] + m.direction[2] * u[2]) > 1 - 1e-6)
        .map((m) => 1 / m.mass);
      return { u, upper: Math.max(...inv), lower: Math.min(...inv) };
    });
    const three =
      branches === 3
        ? threefoldFromDirections(
            dirs.map((u) => ({
              u,
              inv: masses
                .filter((m) => Math.abs(m.direction[0] * u[0] + m.direction[1] * u[1] + m.direction[2] * u[2]) > 1 - 1e-6)
                .map((m) => 1 / m.mass),
            })),
          )
        : null;
    const p = !three && items.length >= 2 ? warpingFromDirections(items) : null;
    if (three) {
      // Three bands (no spin-orbit): the 3×3 form in L, M, N describes every branch.
      const dos = threefoldDosMasses(three);
      if (dos.every((x) => x !== null)) warpedValue = combine(dos);
    } else if (p) {
      const up = warpedDosMass(p, 1);
      const lo = warpedDosMass(p, -1);
      if (up !== null && lo !== null) {
        // The two-branch form stands for the outer branches; a middle branch (three bands, no spin-orbit)
        // keeps its path-weighted value.
        const list = branches === 2 ? [up, lo] : [maximum ? up : lo, ...perBranch.slice(1, -1), maximum ? lo : up];
        warpedValue = combine(list);
      }
    }
  }
  const error = warpedValue !== null ? Math.abs(dosMass - warpedValue) : spread * dosMass;
  const classes = [...new Set(masses.map((m) => starOf(m.direction)))].sort((a, b) => a - b);
  const note =
    `Path-limited density-of-states mass of the ${branches} branches together: each branch's ⟨|m|^(3/2)⟩ over the ${masses.length / branches} path direction${masses.length / branches === 1 ? '' : 's'}, each weighted by its star (${classes.join(', ')} equivalent directions${cartesianOps ? '' : '; symmetry unknown, so equal weights'}), then (Σ m_i^(3/2))^(2/3)${statesPerBranch !== 1 ? ` × (${statesPerBranch})^(2/3) (a spinor run: each band holds one electron, half the states of a band without spin–orbit coupling)` : ''}${nv > 1 ? ` × N_v^(2/3), N_v = ${nv}` : ''}: ` +
    `branch masses ${perBranch.map((x) => x.toPrecision(3)).join(', ')} m_e, total ${dosMass.toPrecision(3)} ± ${error.toPrecision(2)} m_e (estimated error: ` +
    (warpedValue !== null
      ? `difference from the angular integral of the ${branches === 3 ? 'three-band (L, M, N)' : 'warped'} form fitted to these directions, ${warpedValue.toPrecision(3)} m_e`
      : "half the spread of the branch's directional masses") +
    `). Warped bands: a grid or a tensor run (valleyscope tensor-kpoints) gives the full angular average.${valleys === null ? ' N_v unknown: taken as 1.' : ''}`;
  return { perBranch, dosMass, error, note };
}
