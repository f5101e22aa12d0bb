/**
 * How well masses, valley positions and gaps come out of ordinary mesh runs of the EPM crystals
 * (Cohen & Bergstresser, Phys. Rev. 141, 789 (1966)), against the same model solved densely: the lowest
 * conduction extremum (band 5) found by the analysis' star interpolation, and by two trial local models
 * (pairInvariantTrial.ts; a two-band Kane transform of the band, Kane 1957) and the invariants of an isolated
 * band group (groupInvariantTrial.ts), beside the model's own minimum
 * and its mass tensor by central differences (step 0.005 Å⁻¹). A measurement, not a test: it prints a table.
 *
 *   npx tsx scripts/epm/meshMassSurvey.ts [si:12 si:16 ge:12 gaas:12]
 */
import type { Mat3, Vec3 } from '../../src/core/model';
import { ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import { labelOfK } from '../../src/core/lattice/specialPoints';
import { cartesianToFractional } from '../../src/core/lattice/reciprocal';
import { massTensorOf, refineExtremum, type RefinedPoint } from '../../src/core/interpolation/newtonExtremum';
import { positionOnGammaLine } from '../../src/core/interpolation/linePosition';
import type { BandDerivatives, SmoothBand } from '../../src/core/interpolation/starInterpolant';
import { nearbyTouching } from '../../src/core/analysis/meshRunTouching';
import { refineOnTouchingLine } from '../../src/core/analysis/meshRunLinePair';
import { massesAtEvenMeshPoint } from '../../src/core/analysis/meshRunLineMass';
import { MATERIALS, type EpmMaterial } from './materials';
import { epmMeshRun } from './meshRunModel';
import { fitLocalPair, pairSamples } from './pairInvariantTrial';
import { candidateGroups, GroupInvariantBand, isolatedGroups } from './groupInvariantTrial';
import { nearestIrreducible } from '../../src/core/interpolation/extremumUncertainty';

const BANDS = 8;
const CB = 4; // 0-based: band 5, the lowest conduction band of the four-band valence crystals
const H = 0.005; // Å⁻¹, central-difference step of the reference
/** Two bands whose smallest separation over the mesh exceeds this bound two isolated groups (eV). */
const GROUP_MARGIN_EV = 0.01;

interface Case {
  material: EpmMaterial;
  n: number;
}

/** The model's conduction minimum near cartesian k (Newton on the model by central differences) and its masses. */
function modelMinimum(e: (k: Vec3) => number, start: Vec3): { k: Vec3; eV: number; masses: number[]; axes: Mat3 } {
  const hessianAt = (k: Vec3): { g: Vec3; h: Mat3 } => {
    const at = (d: Vec3): number => e([k[0] + d[0], k[1] + d[1], k[2] + d[2]]);
    const unit = (i: number, s: number): Vec3 => [0, 1, 2].map((j) => (j === i ? s * H : 0)) as Vec3;
    const e0 = e(k);
    const g = [0, 1, 2].map((i) => (at(unit(i, 1)) - at(unit(i, -1))) / (2 * H)) as Vec3;
    const h = [0, 1, 2].map((i) =>
      [0, 1, 2].map((j) => {
        if (i === j) return (at(unit(i, 1)) - 2 * e0 + at(unit(i, -1))) / (H * H);
        const pp = at(unit(i, 1).map((x, q) => x + unit(j, 1)[q]!) as Vec3);
        const mm = at(unit(i, -1).map((x, q) => x + unit(j, -1)[q]!) as Vec3);
        const pm = at(unit(i, 1).map((x, q) => x + unit(j, -1)[q]!) as Vec3);
        const mp = at(unit(i, -1).map((x, q) => x + unit(j, 1)[q]!) as Vec3);
        return (pp + mm - pm - mp) / (4 * H * H);
      }),
    ) as Mat3;
    return { g, h };
  };
  let k: Vec3 = [...start];
  for (let it = 0; it < 20; it++) {
    const { g, h } = hessianAt(k);
    // Solve h Δ = −g by Cramer's rule (3×3).
    const det = (m: Mat3): number =>
      m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
      m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
      m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
    const d0 = det(h);
    const step = [0, 1, 2].map((c) => det(h.map((row, r) => row.map((x, q) => (q === c ? -g[r]! : x))) as Mat3) / d0) as Vec3;
    k = [k[0] + step[0], k[1] + step[1], k[2] + step[2]];
    if (Math.hypot(...step) < 1e-7) break;
  }
  const t = massTensorOf(hessianAt(k).h);
  return { k, eV: e(k), masses: [...t.masses].sort((a, b) => a - b), axes: t.axes };
}

/** The band as E_mid ± √y with y a smooth interpolant of (E − E_mid)² (two-band Kane form, Kane 1957). */
function kaneBand(y: SmoothBand, mid: number, sign: 1 | -1): SmoothBand {
  const derivatives = (k: Vec3): BandDerivatives => {
    const d = y.derivatives(k);
    const r = Math.sqrt(Math.max(d.value, 1e-30));
    return {
      value: mid + sign * r,
      gradient: d.gradient.map((x) => (sign * x) / (2 * r)) as Vec3,
      hessian: [0, 1, 2].map((i) =>
        [0, 1, 2].map((j) => sign * (d.hessian[i]![j]! / (2 * r) - (d.gradient[i]! * d.gradient[j]!) / (4 * r * d.value))),
      ) as Mat3,
    };
  };
  return { value: (k) => derivatives(k).value, derivatives };
}

/** ħ²/2m₀ in eV·Å² (CODATA 2018). */
const HBAR2_2M0 = 3.80998212;

/**
 * What a mesh of this density can resolve at the model's extremum: the distance between neighbouring mesh
 * points against the distance from the extremum to where its band stops being analytic, measured on the model:
 * (a) a minimum at Γ: the branch point of the two-band Kane dispersion E(1 + E/E_g) = ħ²k²/2m* (Kane, J. Phys.
 * Chem. Solids 1, 249 (1957)), at |k| = √(m* E_g / 2)/ħ, taking m* and E_g of the model; (b) the nearest point,
 * along the principal axes, where the band meets the next one (within 3 meV) (a touching makes the band's energy a kink there).
 * A band known only beyond such a distance does not fix its curvature at the extremum from energies alone.
 */
function resolution(
  name: string,
  n: number,
  reciprocal: Mat3,
  ref: { k: Vec3; masses: number[]; axes: Mat3 },
  gap: number,
  splitting: (k: Vec3) => number,
): void {
  let step = Infinity;
  for (const i of [-1, 0, 1])
    for (const j of [-1, 0, 1])
      for (const l of [-1, 0, 1]) {
        if (!i && !j && !l) continue;
        const g = [0, 1, 2].map((c) => i * reciprocal[0][c]! + j * reciprocal[1][c]! + l * reciprocal[2][c]!);
        step = Math.min(step, Math.hypot(...g) / n);
      }
  const parts = [`nearest mesh neighbours ${step.toFixed(3)} Å⁻¹ apart`];
  if (Math.hypot(...ref.k) < 1e-6) {
    const kb = Math.sqrt((ref.masses[0]! * gap) / (4 * HBAR2_2M0));
    parts.push(`two-band Kane branch point at ${kb.toFixed(3)} Å⁻¹ (mesh step / that: ${(step / kb).toFixed(2)})`);
  }
  let touch = Infinity;
  // Steps of 0.0005 Å⁻¹: a linear splitting of a few eV·Å is then under 3 meV at the step nearest a touching.
  const dk = 0.0005;
  for (let a = 0; a < 3; a++)
    for (const sign of [1, -1])
      for (let d = dk; d <= 3 * step && d < touch; d += dk) {
        const k = [0, 1, 2].map((c) => ref.k[c]! + sign * d * ref.axes[a]![c]!) as Vec3;
        if (splitting(k) < 3e-3) {
          touch = d;
          break;
        }
      }
  parts.push(
    Number.isFinite(touch)
      ? `the band meets the next one ${touch.toFixed(3)} Å⁻¹ away along a principal axis (mesh step / that: ${(step / touch).toFixed(2)})`
      : `the band meets no other within ${(3 * step).toFixed(2)} Å⁻¹ along its principal axes`,
  );
  console.log(`${name} ${n}³ resolution   ${parts.join('; ')}`);
}

function survey({ material, n }: Case): void {
  const { crystal, solver, kpoints, bands, run, reason, specialPoints: points } = epmMeshRun(material, n, BANDS);
  if (!run || !points) throw new Error(`${material.name} ${n}³: ${reason ?? 'no special points'}`);
  const nk = kpoints.length / 3;
  const x = run.extrema(CB, 'min').extrema[0]!;
  const vbm = run.extrema(CB - 1, 'max').extrema[0]!;
  const model = (k: Vec3): number => solver.bandsAt(cartesianToFractional(k, crystal.lattice), CB + 1)[CB]!;
  const ref = modelMinimum(model, x.resolved ? x.kCartesian : run.toCart(x.k));
  const refGap = ref.eV - solver.bandsAt([0, 0, 0], CB)[CB - 1]!;
  const where = (k: Vec3): string => {
    const f = cartesianToFractional(k, crystal.lattice);
    return positionOnGammaLine(points, f) ?? labelOfK(points, f) ?? f.map((v) => v.toFixed(3)).join(',');
  };
  const massText = (m: readonly number[]): string => {
    const s = [...m].sort((a, b) => a - b);
    return s.map((v, i) => `${v.toFixed(3)} (${(100 * (v / ref.masses[i]! - 1)).toFixed(0)} %)`).join(' ');
  };
  const row = (method: string, k: Vec3, eV: number, masses: readonly number[], note: string): void =>
    console.log(
      `${material.name} ${n}³ ${method.padEnd(14)} at ${where(k).padEnd(12)} gap error ${(1000 * (eV - vbm.energy_eV - refGap)).toFixed(1)} meV  masses ${massText(masses)}  ${note}`,
    );
  console.log(
    `${material.name} ${n}³ model        at ${where(ref.k).padEnd(12)} gap ${refGap.toFixed(4)} eV          masses ${ref.masses.map((m) => m.toFixed(3)).join(' ')}`,
  );
  resolution(material.name, n, run.reciprocal, ref, refGap, (k) => {
    const e = solver.bandsAt(cartesianToFractional(k, crystal.lattice), CB + 2);
    return e[CB + 1]! - e[CB]!;
  });
  const quoted = x.uncertainty.masses.map((u, i) => `${(100 * (u / Math.abs(x.masses[i]!))).toFixed(0)} %`).join(' ');
  row(
    'star',
    x.kCartesian,
    x.energy_eV,
    x.masses,
    `determined ${x.determined} (leave-one-out ${quoted}; miss at the left-out points ${(1000 * x.uncertainty.leftOutError_eV).toFixed(1)} meV)`,
  );
  // What the analysis adopts at an unresolved extremum on an even mesh point (even-line).
  const atPoint = massesAtEvenMeshPoint(run, x, 'star-interpolation');
  if (atPoint) {
    const y = atPoint.extremum;
    const quotedLine = y.uncertainty.masses.map((u, i) => `${(100 * (u / Math.abs(y.masses[i]!))).toFixed(0)} %`).join(' ');
    row('star+even-line', y.kCartesian, y.energy_eV, y.masses, `quoted ${atPoint.axes.determined.join(' ')} (${quotedLine})`);
  }
  // What the analysis adopts when a neighbouring band touches the extremum's band nearby (pair-line).
  const touching = nearbyTouching(run, x);
  const refined = touching ? refineOnTouchingLine(run, x, touching, 'star-interpolation') : null;
  if (refined) {
    const y = refined.extremum;
    const quotedLine = y.uncertainty.masses.map((u, i) => `${(100 * (u / Math.abs(y.masses[i]!))).toFixed(0)} %`).join(' ');
    row('star+pair-line', y.kCartesian, y.energy_eV, y.masses, `quoted ${refined.axes.determined.join(' ')} (${quotedLine})`);
  } else console.log(`${material.name} ${n}³ star+pair-line not used (${touching ? 'the line cannot be used' : 'no band touches nearby'})`);
  const step = Math.min(...run.reciprocal.map((b) => Math.hypot(...b) / n));
  const newton = { maxStep: step / 2, maxTravel: 2 * step };
  const show = (method: string, p: RefinedPoint | null, note = ''): void => {
    if (!p || p.rejected) console.log(`${material.name} ${n}³ ${method.padEnd(14)} ${p ? p.rejected : 'no fit'}`);
    else row(method, p.k, p.energy, p.masses, note);
  };
  // Trial 0: the band from the invariants of an isolated group holding it (groupInvariantTrial.ts), with the
  // largest mass change when each of the 4 nearest irreducible points is left out.
  const groups = isolatedGroups(bands, GROUP_MARGIN_EV);
  const candidates = candidateGroups(groups, CB, bands.length, 8);
  if (!candidates.length)
    console.log(
      `${material.name} ${n}³ group          none (isolated groups ${groups.map((g) => `${g.first + 1}–${g.last + 1}`).join(', ')})`,
    );
  for (const g of candidates) {
    const make = (left: number | null): GroupInvariantBand =>
      new GroupInvariantBand(g, CB, bands, (v, q) => run.fit.fit(v, q), left, run.fit.fit(bands[CB]!, left));
    const p = refineExtremum(make(null), x.kCartesian, 'min', newton);
    let spread = 0;
    for (const left of nearestIrreducible(run.mesh, p.k, run.reciprocal, crystal.lattice, 4)) {
      const again = refineExtremum(make(left), p.k, 'min', newton);
      spread = Math.max(spread, again.rejected ? Infinity : Math.max(...again.masses.map((m, i) => Math.abs(m / p.masses[i]! - 1))));
    }
    show(`group ${g.first + 1}–${g.last + 1}`, p, `leave-one-out ${(100 * spread).toFixed(0)} %`);
  }
  // Trial 1: the pair (bands 5 and 6) by its invariants, local polynomials about the interpolated extremum.
  for (const radius of [2, 2.5, 3]) {
    for (const degree of [3, 4]) {
      const samples = pairSamples(run.mesh, run.reciprocal, bands[CB]!, bands[CB + 1]!, x.k, radius * step + 1e-9);
      const touch = Math.min(...samples.map((q) => q.upper - q.lower));
      const band = fitLocalPair(samples, x.kCartesian, degree, radius * step, -1);
      const note = band ? `residual ${(1000 * band.residual.s).toFixed(0)} meV; bands 5–6 within ${(1000 * touch).toFixed(0)} meV` : '';
      show(`pair r${radius} d${degree}`, band ? refineExtremum(band, x.kCartesian, 'min', newton) : null, note);
    }
  }
  // Trial 2: (E − E_mid)² interpolated, E_mid the middle of the direct gap at the mesh point nearest the extremum.
  let nearest = 0;
  for (let i = 0; i < nk; i++) {
    const d = (j: number): number =>
      Math.hypot(...run.toCart([kpoints[3 * j]!, kpoints[3 * j + 1]!, kpoints[3 * j + 2]!]).map((v, q) => v - x.kCartesian[q]!));
    if (d(i) < d(nearest)) nearest = i;
  }
  const mid = (bands[CB]![nearest]! + bands[CB - 1]![nearest]!) / 2;
  const kane = kaneBand(run.fit.fit(bands[CB]!.map((e) => (e - mid) ** 2)), mid, 1);
  show('kane', refineExtremum(kane, x.kCartesian, 'min', newton), `E_mid ${mid.toFixed(3)} eV`);
  // Trial 3: the pair (bands 5, 6) by its invariants s = (e5+e6)/2, d = ((e6−e5)/2)², each star-interpolated over the
  // whole mesh; e5 = s − √d. Not adopted: band 6 meets band 7 elsewhere in the zone (Γ), which spoils both
  // invariants everywhere (Si 12³: m_l −51 %, m_t +22 %).
  const lo = bands[CB]!;
  const hi = bands[CB + 1]!;
  const sFit = run.fit.fit(lo.map((e, i) => (e + hi[i]!) / 2));
  const dFit = run.fit.fit(lo.map((e, i) => ((hi[i]! - e) / 2) ** 2));
  const pairDerivatives = (k: Vec3): BandDerivatives => {
    const S = sFit.derivatives(k);
    const D = dFit.derivatives(k);
    const dv = Math.max(D.value, 1e-30);
    const r = Math.sqrt(dv);
    return {
      value: S.value - r,
      gradient: S.gradient.map((g, i) => g - D.gradient[i]! / (2 * r)) as Vec3,
      hessian: [0, 1, 2].map((i) =>
        [0, 1, 2].map((j) => S.hessian[i]![j]! - (D.hessian[i]![j]! / (2 * r) - (D.gradient[i]! * D.gradient[j]!) / (4 * r * dv))),
      ) as Mat3,
    };
  };
  show('pair-star', refineExtremum({ value: (k) => pairDerivatives(k).value, derivatives: pairDerivatives }, x.kCartesian, 'min', newton));
}

async function main(): Promise<void> {
  await ensureSymmetryReady();
  const args = process.argv.slice(2);
  const cases = (args.length ? args : ['si:12', 'si:16', 'ge:12', 'gaas:12']).map((a) => {
    const [id, n] = a.split(':');
    const material = MATERIALS[id ?? ''];
    if (!material || !Number(n)) throw new Error(`Expected material:n (${Object.keys(MATERIALS).join(', ')}), got ${a}`);
    return { material, n: Number(n) };
  });
  for (const c of cases) survey(c);
}

void main();
