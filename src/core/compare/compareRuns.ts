/**
 * Compare several runs: match extrema run to run (same side of the gap, same spin, the same valley up to
 * symmetry, the same branch by energy order at that valley — never by band index, which shifts when a run
 * has more semicore bands), and give differences against a reference run. When the lowest conduction
 * valley (or highest valence peak) changes from one k to another, that is reported as an edge moving between
 * valleys, not as a change of mass.
 */
import type { ExtremumReport, Mat3, Report, Vec3 } from '../model';
import { equivalenceDistance, kRotations } from './kEquivalence';
import { structureDescriptors, type StructureDescriptors } from './structureDescriptors';
import { formatK } from '../report/summaryText';

export interface RunInput {
  name: string;
  report: Report;
  lattice: Mat3 | null;
  /** Real-space integer rotations of the crystal (fractional), when known. */
  rotations?: Mat3[] | null;
  /** True when the run came from an annotations file whose sources changed. */
  stale?: boolean;
  /** Where the numbers came from: 'data' (analysed now) or 'annotations'. */
  origin?: 'data' | 'annotations';
}

export type Side = 'conduction' | 'valence';

export interface ValleyColumn {
  id: string;
  side: Side;
  spin: 0 | 1;
  /** Label or k of the valley in the first run where it appears. */
  where: string;
  k: Vec3;
  /** Energy order among extrema of this side at this valley (0: lowest conduction / highest valence). */
  branch: number;
}

export interface MassChange {
  towards: string;
  mass: number;
  referenceMass: number | null;
  /** (mass − reference) / |reference|. */
  relativeChange: number | null;
}

export interface ValleyEntry {
  extremum: ExtremumReport;
  /** Energy from the band edge on its side (eV; ≥ 0). */
  offset_eV: number;
  deltaOffset_eV: number | null;
  masses: MassChange[];
}

export interface ComparedRun {
  name: string;
  isReference: boolean;
  origin: 'data' | 'annotations';
  stale: boolean;
  metal: boolean | null;
  gap_eV: number | null;
  deltaGap_eV: number | null;
  direct: boolean | null;
  vbm: string | null;
  cbm: string | null;
  /** Valley id of the CBM / VBM. */
  cbmValley: string | null;
  vbmValley: string | null;
  descriptors: StructureDescriptors | null;
  /** valley id → entry (absent when the run has no such extremum). */
  valleys: Record<string, ValleyEntry>;
}

export interface ComparisonEvent {
  run: string;
  kind: 'edge-moved' | 'direct-indirect' | 'metal' | 'valley-degeneracy' | 'stale';
  message: string;
}

export interface Comparison {
  reference: string;
  columns: ValleyColumn[];
  runs: ComparedRun[];
  events: ComparisonEvent[];
}

/** Tolerance (fractional, max-norm modulo G) within which two extrema are one valley. */
export const VALLEY_K_TOLERANCE = 0.06;

const sideOf = (e: ExtremumReport): Side => (e.kind === 'cbm' || e.kind === 'valley' ? 'conduction' : 'valence');

function where(e: ExtremumReport): string {
  return e.label ?? formatK(e.k);
}

function sortForBranches(list: ExtremumReport[], side: Side): ExtremumReport[] {
  return [...list].sort((a, b) => (side === 'conduction' ? a.eV - b.eV : b.eV - a.eV));
}

export function compareRuns(runs: RunInput[], referenceName?: string): Comparison {
  if (runs.length === 0) return { reference: '', columns: [], runs: [], events: [] };
  const refIndex = referenceName ? runs.findIndex((r) => r.name === referenceName) : 0;
  if (refIndex < 0) throw new Error(`no run named "${referenceName}" among the runs compared`);
  const ordered = [runs[refIndex]!, ...runs.filter((_, i) => i !== refIndex)];
  const columns: ValleyColumn[] = [];
  const assignment = new Map<RunInput, Map<ExtremumReport, string>>();

  for (const run of ordered) {
    const rots = run.rotations ? kRotations(run.rotations) : null;
    const map = new Map<ExtremumReport, string>();
    // Group this run's extrema by (side, spin, valley); branch = energy order within the group.
    const groups: { side: Side; spin: 0 | 1; k: Vec3; members: ExtremumReport[] }[] = [];
    for (const e of trackedExtrema(run.report, rots)) {
      const side = sideOf(e);
      const g = groups.find((x) => x.side === side && x.spin === e.spin && equivalenceDistance(x.k, e.k, rots) < 1e-4);
      if (g) g.members.push(e);
      else groups.push({ side, spin: e.spin, k: e.k, members: [e] });
    }
    for (const g of groups) {
      sortForBranches(g.members, g.side).forEach((e, branch) => {
        let best: ValleyColumn | null = null;
        let bestD = VALLEY_K_TOLERANCE;
        for (const c of columns) {
          if (c.side !== g.side || c.spin !== g.spin || c.branch !== branch) continue;
          if ([...map.values()].includes(c.id)) continue;
          const d = equivalenceDistance(c.k, e.k, rots);
          if (d < bestD) {
            bestD = d;
            best = c;
          }
        }
        if (!best) {
          const n = columns.filter((c) => c.side === g.side).length + 1;
          best = { id: `${g.side === 'conduction' ? 'c' : 'v'}${n}`, side: g.side, spin: g.spin, where: where(e), k: e.k, branch };
          columns.push(best);
        }
        map.set(e, best.id);
      });
    }
    assignment.set(run, map);
  }

  const ref = ordered[0]!;
  const refMap = assignment.get(ref)!;
  const refById = new Map<string, ExtremumReport>();
  for (const [e, id] of refMap) refById.set(id, e);
  const events: ComparisonEvent[] = [];
  const refCbm = ref.report.extrema.find((e) => e.kind === 'cbm');
  const refVbm = ref.report.extrema.find((e) => e.kind === 'vbm');

  const compared: ComparedRun[] = runs.map((run) => {
    const map = assignment.get(run)!;
    const isReference = run === ref;
    const valleys: Record<string, ValleyEntry> = {};
    for (const [e, id] of map) {
      const r = refById.get(id);
      const masses: MassChange[] = e.masses.map((m) => {
        // Same direction and, at a degenerate edge, the same branch (heavy with heavy, light with light).
        const rm = r?.masses.find((x) => x.towards === m.towards && (x.branch ?? 0) === (m.branch ?? 0)) ?? null;
        // A change is given only between masses that can be quoted (an undetermined one has no value to compare).
        const both = !!rm && m.determined !== false && rm.determined !== false;
        return {
          towards: m.branch !== undefined ? `${m.towards} (branch ${m.branch})` : m.towards,
          mass: m.mass,
          referenceMass: rm ? rm.mass : null,
          relativeChange: both ? (m.mass - rm!.mass) / Math.abs(rm!.mass) : null,
        };
      });
      valleys[id] = { extremum: e, offset_eV: e.offset_eV, deltaOffset_eV: r ? e.offset_eV - r.offset_eV : null, masses };
      if (r && !isReference && r.valleyDegeneracy !== null && e.valleyDegeneracy !== null && r.valleyDegeneracy !== e.valleyDegeneracy) {
        events.push({ run: run.name, kind: 'valley-degeneracy', message: `valley ${id} (${where(e)}): N_v ${r.valleyDegeneracy} → ${e.valleyDegeneracy} (symmetry lowered or raised)` });
      }
    }
    const cbm = run.report.extrema.find((e) => e.kind === 'cbm');
    const vbm = run.report.extrema.find((e) => e.kind === 'vbm');
    const g = run.report.gap;
    const rg = ref.report.gap;
    const out: ComparedRun = {
      name: run.name,
      isReference,
      origin: run.origin ?? 'data',
      stale: !!run.stale,
      metal: run.report.metal,
      gap_eV: g ? g.eV : null,
      deltaGap_eV: g && rg ? g.eV - rg.eV : null,
      direct: g ? g.direct : null,
      vbm: g ? (g.vbm.label ?? formatK(g.vbm.k)) : null,
      cbm: g ? (g.cbm.label ?? formatK(g.cbm.k)) : null,
      cbmValley: cbm ? (map.get(cbm) ?? null) : null,
      vbmValley: vbm ? (map.get(vbm) ?? null) : null,
      descriptors: run.lattice ? structureDescriptors(run.lattice, ref.lattice && sameShape(ref.lattice, run.lattice) ? ref.lattice : null) : null,
      valleys,
    };
    if (!isReference) {
      const refCbmId = refCbm ? refMap.get(refCbm) : undefined;
      const refVbmId = refVbm ? refMap.get(refVbm) : undefined;
      if (refCbmId && out.cbmValley && refCbmId !== out.cbmValley) {
        events.push({ run: run.name, kind: 'edge-moved', message: `the conduction band minimum moved from valley ${refCbmId} (${where(refCbm!)}) to valley ${out.cbmValley} (${where(cbm!)})` });
      }
      if (refVbmId && out.vbmValley && refVbmId !== out.vbmValley) {
        events.push({ run: run.name, kind: 'edge-moved', message: `the valence band maximum moved from valley ${refVbmId} (${where(refVbm!)}) to valley ${out.vbmValley} (${where(vbm!)})` });
      }
      if (rg && g && rg.direct !== g.direct) {
        events.push({ run: run.name, kind: 'direct-indirect', message: `the gap became ${g.direct ? 'direct' : 'indirect'}` });
      }
      if (ref.report.metal !== run.report.metal && run.report.metal !== null && ref.report.metal !== null) {
        events.push({ run: run.name, kind: 'metal', message: run.report.metal ? 'the gap closed: metallic' : 'a gap opened' });
      }
    }
    if (run.stale) events.push({ run: run.name, kind: 'stale', message: 'its annotations no longer match the data files they were made from' });
    return out;
  });
  return { reference: ref.name, columns, runs: compared, events };
}

/**
 * The extrema a comparison follows: never a candidate the analysis set aside (a saddle, a crossing, a path
 * end), even when a report lists it among its extrema too (reports built from older annotations files).
 */
function trackedExtrema(report: Report, rots: ReturnType<typeof kRotations> | null): ExtremumReport[] {
  const rejected = report.rejected ?? [];
  if (!rejected.length) return report.extrema;
  return report.extrema.filter(
    (e) => e.kind === 'vbm' || e.kind === 'cbm' || !rejected.some((x) => x.spin === e.spin && (x.band === e.band || Math.abs(x.eV - e.eV) <= 1e-3) && equivalenceDistance(x.k, e.k, rots) < 1e-4),
  );
}

/** Lattices describe the same cell choice when their metrics are within 20 % (a strain series, not another cell). */
function sameShape(a: Mat3, b: Mat3): boolean {
  for (let i = 0; i < 3; i++) {
    const la = Math.hypot(...a[i]!);
    const lb = Math.hypot(...b[i]!);
    if (Math.abs(la / lb - 1) > 0.2) return false;
  }
  return true;
}
