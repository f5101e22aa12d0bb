/**
 * Compare several runs: match extrema run to run (same side of the gap, same spin, the same valley up to
 * symmetry, the same branch by energy order at that valley — never by band index, which shifts when a run
 * has more semicore bands), and give differences against a reference run.
 *
 * Honest matching:
 * - a valley is matched across runs only when the runs share a lattice type (the same Bravais class, or the
 *   same cell up to strain) and the k-points are equivalent under the reference crystal's symmetry; a valley
 *   that drifted (the Δ minimum moving along Γ–X under strain) is matched only within the same crystal (same
 *   composition) and only between points with the same little group (a point on Γ–X is never "the same
 *   valley" as X, and Si's minimum on Γ–X is not GaAs's point on Γ–X);
 * - a valley of the reference whose copies split in energy in another run (6 → 4 + 2 under biaxial strain) is
 *   one event, "valley split", and the run's lower part stands in the column;
 * - mass differences are on magnitudes, (|m| − |m_ref|)/|m_ref|, each labelled with its direction and branch;
 *   branch masses are paired only between edges of equal degeneracy, else "degeneracy changed".
 * When the lowest conduction valley (or highest valence peak) changes from one k to another, that is reported
 * as an edge moving between valleys, not as a change of mass. Parts: valleyMatching.ts (when two extrema are
 * the same valley), massComparison.ts (mass differences).
 */
import type { ExtremumReport, Mat3, Report, Vec3 } from '../model';
import { equivalenceDistance, kRotations } from './kEquivalence';
import { structureDescriptors, type StructureDescriptors } from './structureDescriptors';
import { formatK } from '../report/summaryText';
import { pathPosition, type LabelledLine } from '../lattice/pathPosition';
import { sameShape, sameValley, shareLatticeType, trackedExtrema, type Matcher } from './valleyMatching';
import { compareMasses } from './massComparison';

export interface RunInput {
  name: string;
  report: Report;
  lattice: Mat3 | null;
  /** Real-space integer rotations of the crystal (fractional), when known. */
  rotations?: Mat3[] | null;
  /** Bravais class of the crystal (e.g. 'cF', 'tI'), when known. */
  latticeType?: string | null;
  /** Lattice points in the run's cell (1: primitive), when the symmetry is known (conventional constants). */
  latticePointsPerCell?: number | null;
  /** Species and counts of the cell (e.g. 'Ga1 As1'), when known: runs of one crystal may see valleys drift. */
  composition?: string | null;
  /** The labelled lines of the run's path, to name unlabelled points as "0.85 Γ→X". */
  pathLines?: LabelledLine[] | null;
  /** Fermi energy the run's files give (eV), for --energy-zero fermi; null or absent when unknown. */
  fermi_eV?: number | null;
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

export type MassComparison = 'reference' | 'compared' | 'no reference' | 'degeneracy changed' | 'undetermined';

export interface MassChange {
  /** Direction and branch as shown: "X" or "X (branch 2)". */
  towards: string;
  /** Where the direction points (label or k). */
  direction: string;
  /** At a degenerate edge: the branch (1-based) followed; null otherwise. */
  branch: number | null;
  /** Signed curvature mass, m_e. */
  mass: number;
  referenceMass: number | null;
  /** (|m| − |m_ref|) / |m_ref|: positive when the carrier got heavier, for electrons and holes alike. */
  relativeChange: number | null;
  status: MassComparison;
}

export interface ValleyEntry {
  extremum: ExtremumReport;
  /** Energy from the band edge on its side (eV; ≥ 0). */
  offset_eV: number;
  deltaOffset_eV: number | null;
  masses: MassChange[];
  /** Other extrema of this run in the same valley of the reference (its copies split in energy). */
  split: ExtremumReport[];
  /** The number of degenerate bands differs from the reference's at this valley. */
  degeneracyChanged: boolean;
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
  /** The run has two spin channels (outputs then name each valley's channel up/down). */
  spinPolarised: boolean;
  /** The run the strain descriptors are relative to (the reference), or null when they are not. */
  relativeTo: string | null;
  /** valley id → entry (absent when the run has no such extremum). */
  valleys: Record<string, ValleyEntry>;
}

export interface ComparisonEvent {
  run: string;
  kind: 'edge-moved' | 'direct-indirect' | 'metal' | 'valley-degeneracy' | 'valley-split' | 'degeneracy-changed' | 'not-matched' | 'stale';
  message: string;
}

export interface Comparison {
  reference: string;
  columns: ValleyColumn[];
  runs: ComparedRun[];
  events: ComparisonEvent[];
}

const sideOf = (e: ExtremumReport): Side => (e.kind === 'cbm' || e.kind === 'valley' ? 'conduction' : 'valence');

/** A point as people name it: its label, its place on a labelled line ("0.85 Γ→X"), or its fractional k. */
function where(e: { label: string | null; k: Vec3 }, lines: LabelledLine[] | null = null): string {
  return e.label ?? (lines ? pathPosition(e.k, lines) : null) ?? formatK(e.k);
}

function sortForBranches(list: ExtremumReport[], side: Side): ExtremumReport[] {
  return [...list].sort((a, b) => (side === 'conduction' ? a.eV - b.eV : b.eV - a.eV));
}

export function compareRuns(runs: RunInput[], referenceName?: string): Comparison {
  if (runs.length === 0) return { reference: '', columns: [], runs: [], events: [] };
  const refIndex = referenceName ? runs.findIndex((r) => r.name === referenceName) : 0;
  if (refIndex < 0) throw new Error(`no run named "${referenceName}" among the runs compared`);
  const ref = runs[refIndex]!;
  const ordered = [ref, ...runs.filter((_, i) => i !== refIndex)];
  const columns: ValleyColumn[] = [];
  /** Per run: the column of each extremum, and extra extrema that fell into a column already taken (a split). */
  const assignment = new Map<RunInput, Map<ExtremumReport, string>>();
  const splits = new Map<RunInput, Map<string, ExtremumReport[]>>();
  const events: ComparisonEvent[] = [];
  const refRots = ref.rotations ? kRotations(ref.rotations) : null;

  for (const run of ordered) {
    const ownRots = run.rotations ? kRotations(run.rotations) : null;
    const lt = run === ref ? { shared: true, why: '' } : shareLatticeType(ref, run);
    if (!lt.shared) events.push({ run: run.name, kind: 'not-matched', message: `no valley is matched with the reference: ${lt.why}` });
    const matcher: Matcher = {
      kRots: refRots ?? ownRots,
      shared: lt.shared,
      drift: run === ref || !ref.composition || !run.composition || ref.composition === run.composition,
    };
    const map = new Map<ExtremumReport, string>();
    const extra = new Map<string, ExtremumReport[]>();
    // Group this run's extrema by (side, spin, valley under its own symmetry); branch = energy order within.
    const groups: { side: Side; spin: 0 | 1; k: Vec3; members: ExtremumReport[] }[] = [];
    for (const e of trackedExtrema(run.report, ownRots)) {
      const side = sideOf(e);
      const g = groups.find((x) => x.side === side && x.spin === e.spin && equivalenceDistance(x.k, e.k, ownRots) < 1e-4);
      if (g) g.members.push(e);
      else groups.push({ side, spin: e.spin, k: e.k, members: [e] });
    }
    // Lowest conduction / highest valence groups first, so the lower part of a split valley takes the column.
    const groupEnergy = (g: (typeof groups)[number]): number =>
      g.side === 'conduction' ? Math.min(...g.members.map((e) => e.eV)) : -Math.max(...g.members.map((e) => e.eV));
    groups.sort((a, b) => groupEnergy(a) - groupEnergy(b));
    const ownColumns = new Set<string>();
    for (const g of groups) {
      sortForBranches(g.members, g.side).forEach((e, branch) => {
        let best: ValleyColumn | null = null;
        let bestD = Infinity;
        for (const c of columns) {
          if (c.side !== g.side || c.spin !== g.spin || c.branch !== branch || ownColumns.has(c.id)) continue;
          if (!sameValley(matcher, c.k, e.k)) continue;
          const d = equivalenceDistance(c.k, e.k, matcher.kRots);
          if (d < bestD) {
            bestD = d;
            best = c;
          }
        }
        const taken = best ? [...map.entries()].find(([, id]) => id === best!.id) : undefined;
        if (best && taken) {
          // A second copy of one reference valley in this run, at another energy: the valley split.
          extra.set(best.id, [...(extra.get(best.id) ?? []), e]);
          return;
        }
        if (!best) {
          const n = columns.filter((c) => c.side === g.side).length + 1;
          best = {
            id: `${g.side === 'conduction' ? 'c' : 'v'}${n}`,
            side: g.side,
            spin: g.spin,
            where: where(e, run.pathLines ?? null),
            k: e.k,
            branch,
          };
          columns.push(best);
          if (run === ref) ownColumns.add(best.id);
        }
        map.set(e, best.id);
      });
    }
    assignment.set(run, map);
    splits.set(run, extra);
  }

  const refMap = assignment.get(ref)!;
  const refById = new Map<string, ExtremumReport>();
  for (const [e, id] of refMap) refById.set(id, e);
  const refCbm = ref.report.extrema.find((e) => e.kind === 'cbm');
  const refVbm = ref.report.extrema.find((e) => e.kind === 'vbm');

  const compared: ComparedRun[] = runs.map((run) => {
    const map = assignment.get(run)!;
    const extra = splits.get(run)!;
    const isReference = run === ref;
    const valleys: Record<string, ValleyEntry> = {};
    for (const [e, id] of map) {
      const r = refById.get(id);
      const { masses, degeneracyChanged } = compareMasses(e, r, isReference);
      const split = extra.get(id) ?? [];
      valleys[id] = {
        extremum: e,
        offset_eV: e.offset_eV,
        deltaOffset_eV: r ? e.offset_eV - r.offset_eV : null,
        masses,
        split,
        degeneracyChanged,
      };
      if (isReference || !r) continue;
      if (split.length) {
        const parts = [e, ...split].map(
          (x) =>
            `${x.valleyDegeneracy ?? '?'} at ${where(x, run.pathLines ?? null)}${x === e ? '' : ` (+${((sideOf(x) === 'conduction' ? x.eV - e.eV : e.eV - x.eV) * 1000).toFixed(0)} meV)`}`,
        );
        events.push({
          run: run.name,
          kind: 'valley-split',
          message: `valley split: ${id} (${where(r, ref.pathLines ?? null)}, N_v ${r.valleyDegeneracy ?? '?'}) → ${parts.join(' + ')}`,
        });
      } else if (r.valleyDegeneracy !== null && e.valleyDegeneracy !== null && r.valleyDegeneracy !== e.valleyDegeneracy) {
        events.push({
          run: run.name,
          kind: 'valley-degeneracy',
          message: `valley ${id} (${where(e, run.pathLines ?? null)}): N_v ${r.valleyDegeneracy} → ${e.valleyDegeneracy} (symmetry lowered or raised)`,
        });
      }
      if (degeneracyChanged) {
        events.push({
          run: run.name,
          kind: 'degeneracy-changed',
          message: `degeneracy changed: valley ${id} (${where(e, run.pathLines ?? null)}) has ${e.degenerateBands} degenerate band${e.degenerateBands === 1 ? '' : 's'}, the reference ${r.degenerateBands}; its branch masses are not paired`,
        });
      }
    }
    const cbm = run.report.extrema.find((e) => e.kind === 'cbm');
    const vbm = run.report.extrema.find((e) => e.kind === 'vbm');
    const g = run.report.gap;
    const rg = ref.report.gap;
    // Strain only between cells of one crystal (another material's cell is not a strained reference).
    const sameCrystal = !ref.composition || !run.composition || ref.composition === run.composition;
    const relative = !!(run.lattice && ref.lattice && sameShape(ref.lattice, run.lattice) && sameCrystal);
    const out: ComparedRun = {
      name: run.name,
      isReference,
      origin: run.origin ?? 'data',
      stale: !!run.stale,
      metal: run.report.metal,
      gap_eV: g ? g.eV : null,
      deltaGap_eV: g && rg ? g.eV - rg.eV : null,
      direct: g ? g.direct : null,
      vbm: g ? where(g.vbm, run.pathLines ?? null) : null,
      cbm: g ? where(g.cbm, run.pathLines ?? null) : null,
      cbmValley: cbm ? (map.get(cbm) ?? null) : null,
      vbmValley: vbm ? (map.get(vbm) ?? null) : null,
      descriptors: run.lattice ? structureDescriptors(run.lattice, relative ? ref.lattice : null) : null,
      spinPolarised: run.report.nspin === 2,
      relativeTo: run.lattice && relative ? ref.name : null,
      valleys,
    };
    if (!isReference) {
      const refCbmId = refCbm ? refMap.get(refCbm) : undefined;
      const refVbmId = refVbm ? refMap.get(refVbm) : undefined;
      if (refCbmId && out.cbmValley && refCbmId !== out.cbmValley) {
        events.push({
          run: run.name,
          kind: 'edge-moved',
          message: `the conduction band minimum moved from valley ${refCbmId} (${where(refCbm!, ref.pathLines ?? null)}) to valley ${out.cbmValley} (${where(cbm!, run.pathLines ?? null)})`,
        });
      }
      if (refVbmId && out.vbmValley && refVbmId !== out.vbmValley) {
        events.push({
          run: run.name,
          kind: 'edge-moved',
          message: `the valence band maximum moved from valley ${refVbmId} (${where(refVbm!, ref.pathLines ?? null)}) to valley ${out.vbmValley} (${where(vbm!, run.pathLines ?? null)})`,
        });
      }
      if (rg && g && rg.direct !== g.direct) {
        events.push({ run: run.name, kind: 'direct-indirect', message: `the gap became ${g.direct ? 'direct' : 'indirect'}` });
      }
      if (ref.report.metal !== run.report.metal && run.report.metal !== null && ref.report.metal !== null) {
        events.push({ run: run.name, kind: 'metal', message: run.report.metal ? 'the gap closed: metallic' : 'a gap opened' });
      }
    }
    if (run.stale)
      events.push({ run: run.name, kind: 'stale', message: 'its annotations no longer match the data files they were made from' });
    return out;
  });
  return { reference: ref.name, columns, runs: compared, events };
}
