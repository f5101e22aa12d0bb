/**
 * The readable lines of a mesh run's interpolated results: which mesh and method, the gap's uncertainty, and
 * each interpolated mass tensor with its leave-one-out uncertainty (or the word undetermined and why).
 */
import type { ExtremumReport, GapReport, Report } from '../model';

const fixed = (x: number, digits: number): string => {
  const s = x.toFixed(digits);
  return s === `-${(0).toFixed(digits)}` ? s.slice(1) : s;
};

/** The line saying the results are interpolated, and how (null for other runs). */
export function interpolationLine(r: Report): string | null {
  const i = r.interpolation;
  if (!i) return null;
  const spin = (n: number): string => (i.bands.length === 2 ? ` (spin ${n === 0 ? 'up' : 'down'})` : '');
  const bands = i.bands.map(([a, b], n) => `${a === b ? `band ${a}` : `bands ${a}–${b}`}${spin(n)}`).join(' and ');
  const declared = i.declaredBy ? `, as ${i.declaredBy} declares` : '';
  const m = i.mergedEquivalentPoints;
  const merged = m
    ? ` The file lists points equivalent by the crystal's symmetry (a run reduced by fewer operations, e.g. VASP's ISYM = 0 or −1): its ${m.listed} points were read as ${m.kept}, one per star (their energies agree within ${(1000 * m.largestDifference_eV).toFixed(2)} meV).`
    : '';
  return `  Mesh run: ${bands} interpolated from the ${i.divisions.join('×')} mesh${declared} (${i.irreduciblePoints} irreducible points, ${i.stars} star functions) by star-function interpolation with minimum Pickett–Krakauer–Allen roughness; the edges and masses below are interpolated.${merged}`;
}

/** "± 0.3 meV (interpolated)" after a gap from interpolated edges; empty otherwise. */
export function gapUncertaintyText(g: GapReport): string {
  if (g.source !== 'interpolated') return '';
  const u = g.uncertainty_eV;
  return u === null || u === undefined ? ' (interpolated; uncertainty unknown)' : ` ± ${fixed(u * 1000, 1)} meV (interpolated)`;
}

/** The interpolated mass tensor of an extremum, with uncertainties; null when the extremum is not interpolated. */
export function interpolatedMassLines(e: ExtremumReport): string[] | null {
  if (!e.interpolated) return null;
  const lines: string[] = [];
  const u = e.interpolated.energyUncertainty_eV;
  if (u !== null) lines.push(`    energy uncertainty ${fixed(u * 1000, 2)} meV (leave-one-out)`);
  const t = e.tensor;
  if (!t) {
    lines.push('    masses: none (the interpolation does not resolve this extremum)');
    return lines;
  }
  const atMax = e.kind === 'vbm' || e.kind === 'peak';
  const state = t.determined === false ? `undetermined: ${(t.undeterminedReason ?? 'not quotable').replace(/\.$/, '')}` : 'quotable';
  lines.push(`    interpolated mass tensor (analytic Hessian of the interpolant; uncertainties leave-one-out; ${state}):`);
  t.principal.forEach((m, i) => {
    const err = t.stderr?.[i];
    // Each principal mass may be quoted on its own (its directional entry says so, and by which method).
    const fit = e.masses[i];
    const quoted = fit?.determined ?? t.determined !== false;
    const how = fit && fit.method !== t.method && t.method.includes('+') ? ` [${fit.method}]` : '';
    const value = quoted ? `m${i + 1} = ${fixed(m, 3)}` : `m${i + 1} undetermined (the interpolant gives ${fixed(m, 3)}`;
    const close = quoted ? how : `)${how}`;
    const hole = atMax && m < 0 && quoted ? ` (hole mass ${fixed(-m, 3)})` : '';
    lines.push(
      `      ${value}${err !== undefined && Number.isFinite(err) ? ` ± ${fixed(err, 3)}` : ''} m_e${close} along (${t.axes[i]!.map((x) => fixed(x, 3)).join(', ')})${hole}`,
    );
  });
  if (e.interpolated.touchingBands.length)
    lines.push(`    band ${e.interpolated.touchingBands.join(' and ')} within the interpolation's error here`);
  return lines;
}

/**
 * One sentence with what the mesh analysis found anywhere in the zone (for a view that shows the
 * interpolated bands along a path only); null for other runs.
 */
export function meshResultLine(r: Report): string | null {
  if (!r.interpolation) return null;
  const place = (p: { label: string | null; position?: string | null; k: readonly number[] }): string =>
    p.label ?? p.position ?? `(${p.k.map((x) => fixed(x, 4)).join(', ')})`;
  const g = r.gap;
  const valley = (kind: 'vbm' | 'cbm'): string => {
    const e = r.extrema.find((x) => x.kind === kind);
    return e && e.valleyDegeneracy !== null ? `, N_v = ${e.valleyDegeneracy}` : '';
  };
  const gap = g
    ? `gap ${fixed(g.eV, 4)} eV${gapUncertaintyText(g)}, ${g.direct ? 'direct' : 'indirect'}; VBM at ${place(g.vbm)}${valley('vbm')}; CBM at ${place(g.cbm)}${valley('cbm')}`
    : 'no gap';
  return `The analysis of the ${r.interpolation.divisions.join('×')} mesh itself (extrema anywhere in the zone, interpolated mass tensors with uncertainties: valleyscope analyze) gives: ${gap}.`;
}
