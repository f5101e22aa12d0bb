/**
 * Mass differences against the reference run: on magnitudes, (|m| − |m_ref|)/|m_ref|, the same direction and
 * (at a degenerate edge) the same branch, only between edges of equal degeneracy and determined masses.
 */
import type { ExtremumReport } from '../model';
import type { MassChange } from './compareRuns';

function massLabel(towards: string, branch: number | null): string {
  return branch !== null ? `${towards} (branch ${branch})` : towards;
}

export function compareMasses(
  e: ExtremumReport,
  r: ExtremumReport | undefined,
  isReference: boolean,
): { masses: MassChange[]; degeneracyChanged: boolean } {
  // Masses pair branch by branch: the same number of branches (a Kramers pair of a spinor run is one branch, as
  // the band without spin–orbit coupling), or, without masses, the same number of bands.
  const branches = (x: ExtremumReport): number => Math.max(1, ...x.masses.map((m) => m.branch ?? 1));
  const comparable = (a: ExtremumReport, b: ExtremumReport): boolean =>
    a.masses.length && b.masses.length ? branches(a) === branches(b) : a.degenerateBands === b.degenerateBands;
  const degeneracyChanged = !isReference && r !== undefined && !comparable(r, e);
  const masses = e.masses.map((m): MassChange => {
    const branch = m.branch ?? null;
    const base = { towards: massLabel(m.towards, branch), direction: m.towards, branch, mass: m.mass };
    if (isReference) return { ...base, referenceMass: null, relativeChange: null, status: 'reference' };
    if (!r) return { ...base, referenceMass: null, relativeChange: null, status: 'no reference' };
    if (degeneracyChanged) return { ...base, referenceMass: null, relativeChange: null, status: 'degeneracy changed' };
    // Same direction and, at a degenerate edge, the same branch (heavy with heavy, light with light).
    const rm = r.masses.find((x) => x.towards === m.towards && (x.branch ?? null) === branch);
    if (!rm || !Number.isFinite(rm.mass) || rm.mass === 0 || !Number.isFinite(m.mass))
      return { ...base, referenceMass: rm ? rm.mass : null, relativeChange: null, status: 'no reference' };
    // A change is given only between masses that can be quoted (an undetermined one has no value to compare).
    if (m.determined === false || rm.determined === false)
      return { ...base, referenceMass: rm.mass, relativeChange: null, status: 'undetermined' };
    return {
      ...base,
      referenceMass: rm.mass,
      relativeChange: (Math.abs(m.mass) - Math.abs(rm.mass)) / Math.abs(rm.mass),
      status: 'compared',
    };
  });
  return { masses, degeneracyChanged };
}
