/**
 * Insulator, metal or semimetal: one verdict per spin channel and overall, from the strongest evidence the
 * run's files hold, in this order (physics.md, "Metals, semimetals and smearing": common practice):
 *   1. occupations: a band filled (above half of full) at some k and empty (below half) at others, or a state
 *      clearly partly filled; smearing tails (1e-4 and below, up to TAIL_LIMIT) are not partial filling;
 *   2. the Fermi energy the file writes: inside the energy range a band spans over the sampled k;
 *   3. the electron count: it cannot fill whole bands (odd without spin polarisation or spinors; non-integer);
 *   4. band order at the edges: the highest filled state at or above the lowest empty one.
 * A Fermi energy found on other k-points than the run's (BandStructure.fermiFromOtherKPoints: VASP's KPOINTS_OPT set)
 * comes after the electron count: a self-consistent mesh that misses a band edge puts it inside a band on a path.
 * A semimetal is a metal whose overlap is between two distinct bands, the lower with hole pockets and the upper
 * with electron pockets, the electron count filling a whole number of bands.
 * Parts: bandFilling.ts (k weights, filling, the Fermi level a count fills), semimetal.ts (the semimetal test).
 * Pure: no I/O.
 */
import type { BandStructure } from '../model';
import type { OccupationRule } from './occupation';
import {
  electronsPerBand,
  fillingFermiLevel,
  markFilled,
  fullOccupation,
  LEVEL_EV,
  occupationFractions,
  totalElectrons,
  wholeBandsPerChannel,
} from './bandFilling';
import { scanOccupations } from './occupationScan';
import { keepKPointEdges } from './gap';
import { semimetalVerdict } from './semimetal';

/** Which evidence decided. */
export type ClassEvidence = 'occupations' | 'fermi' | 'count' | 'edges' | 'none';

/** Occupation fractions this close to 0 or 1 are smearing tails, not partial filling. */
export const TAIL_LIMIT = 0.05;
/** A written Fermi energy this close to a band's extreme value counts as at the edge, not inside (eV). */
export const FERMI_INSIDE_TOLERANCE_EV = 2e-3;

export interface ChannelVerdict {
  spin: 0 | 1;
  metal: boolean | null;
  semimetal: boolean | null;
  /** 0-based bands of this channel that cross the Fermi level. */
  crossing: number[];
  reason: string;
}

export interface ConductionClass {
  metal: boolean | null;
  semimetal: boolean | null;
  /** Fermi level: as written, or estimated (then `fermiEstimated`); null if neither. */
  fermi_eV: number | null;
  fermiEstimated: boolean;
  evidence: ClassEvidence;
  /** One sentence for the user. */
  reason: string;
  spins: ChannelVerdict[];
  /** Non-fatal remarks (e.g. evidences that disagree, large smearing tails). */
  warnings: string[];
}

interface BandRange {
  min: number;
  max: number;
}

function bandRanges(bs: BandStructure, spin: number): BandRange[] {
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  const out: BandRange[] = Array.from({ length: nb }, () => ({ min: Infinity, max: -Infinity }));
  for (let k = 0; k < bs.nk; k++) {
    for (let b = 0; b < nb; b++) {
      const x = e[k * nb + b]!;
      const r = out[b]!;
      if (x < r.min) r.min = x;
      if (x > r.max) r.max = x;
    }
  }
  return out;
}

/** "band 3" / "bands 3 and 4", numbered as the user sees them (from offset + 1, offset = the file's numbering). */
const bandList = (bands: number[], offset: number): string => {
  const b = bands.map((x) => x + 1 + offset);
  return b.length === 1 ? `band ${b[0]}` : `bands ${b.slice(0, -1).join(', ')} and ${b[b.length - 1]}`;
};
const eV = (x: number): string => `${x.toFixed(4)} eV`;

export function classifyConduction(bs: BandStructure, occ: OccupationRule | null): ConductionClass {
  const offset = bs.bandNumberOffset ?? 0;
  const warnings: string[] = [];
  const spins = Array.from({ length: bs.nSpin }, (_, s) => s);
  // Each band's energy range per channel: made when a Fermi level is compared with it.
  let ranges: BandRange[][] | null = null;
  const perBand = electronsPerBand(bs, occ);
  const written = bs.fermiEnergy;
  const per: ChannelVerdict[] = [];
  let evidence: ClassEvidence = 'none';
  let fermi: number | null = written;
  let fermiEstimated = false;
  // Occupations as fractions of a full state: made only when a metal's filling needs them.
  let fractions: Float64Array[] | null = null;
  const fractionsOf = (): Float64Array[] => (fractions ??= occupationFractions(bs));
  // A Fermi energy found on other k-points (a KPOINTS_OPT set, a hybrid run's path): when occupation.ts filled the
  // states by the electron count, that count decides before the Fermi energy.
  const countFirst = bs.fermiFromOtherKPoints === true && occ?.basis === 'electrons';

  const crossingAt = (s: number, ef: number): number[] =>
    (ranges ??= spins.map((c) => bandRanges(bs, c)))[s]!.flatMap((r, b) =>
      r.min < ef - FERMI_INSIDE_TOLERANCE_EV && r.max > ef + FERMI_INSIDE_TOLERANCE_EV ? [b] : [],
    );

  if (occ && occ.basis === 'occupations' && bs.occupations) {
    evidence = 'occupations';
    const full = fullOccupation(bs.occupations);
    let largestTail = 0;
    let maxFilled = -Infinity;
    let minEmpty = Infinity;
    for (const s of spins) {
      const scan = scanOccupations(bs.occupations[s]!, bs.energies[s]!, full, bs.nk, bs.nBands, TAIL_LIMIT);
      keepKPointEdges(bs, occ, s, scan.kEdges);
      largestTail = Math.max(largestTail, scan.largestTail);
      maxFilled = Math.max(maxFilled, scan.maxFilled);
      minEmpty = Math.min(minEmpty, scan.minEmpty);
      const crossing: number[] = [];
      const straddling: number[] = [];
      for (let b = 0; b < bs.nBands; b++) {
        const straddles = scan.filledSomewhere[b] === 1 && scan.emptySomewhere[b] === 1;
        if (straddles) straddling.push(b);
        if (straddles || scan.partial[b] === 1) crossing.push(b);
      }
      const metal = crossing.length > 0;
      // Bands only smeared at E_F (partly filled everywhere sampled) lie near it; the crossing ones straddle it.
      if (straddling.length > 0) crossing.splice(0, crossing.length, ...straddling);
      let reason: string;
      if (!metal)
        reason = 'The occupations fill every band either completely or not at all at each k-point: no band crosses the Fermi level.';
      else if (straddling.length > 0)
        reason = `The occupations show ${bandList(straddling, offset)} filled at some k-points and empty at others: ${straddling.length === 1 ? 'it crosses' : 'they cross'} the Fermi level.`;
      else
        reason = `The occupations show ${bandList(crossing, offset)} partly filled (occupation ${scan.partlyFilledValue.toFixed(2)} of a full state): states lie at the Fermi level.`;
      per.push({ spin: s as 0 | 1, metal, semimetal: null, crossing, reason });
    }
    if (largestTail > 1e-4 && !per.some((v) => v.metal)) {
      warnings.push(
        `Smearing tails reach ${largestTail.toExponential(1)} of a full state: partly filled states below ${TAIL_LIMIT} were read as tails, not as a metal.`,
      );
    }
    if (fermi === null && Number.isFinite(maxFilled) && Number.isFinite(minEmpty)) {
      fermi =
        maxFilled < minEmpty ? 0.5 * (maxFilled + minEmpty) : fillingFermiLevel(bs, totalElectrons(bs, fractionsOf(), perBand), perBand);
      fermiEstimated = fermi !== null;
    }
  } else if (written !== null && !countFirst) {
    evidence = 'fermi';
    const perChannel = bs.nSpin === 2 && bs.fermiEnergies ? bs.fermiEnergies : null;
    const source =
      bs.fermiSource === 'highestOccupiedLevel' ? 'highest occupied level' : perChannel ? "channel's Fermi energy" : 'Fermi energy';
    for (const s of spins) {
      const ef = perChannel ? perChannel[s]! : written;
      const crossing = crossingAt(s, ef);
      const reason = crossing.length
        ? `The ${source} the file writes (${eV(ef)}) lies inside the energy range of ${bandList(crossing, offset)}.`
        : `The ${source} the file writes (${eV(ef)}) lies outside the energy range of every band.`;
      per.push({ spin: s as 0 | 1, metal: crossing.length > 0, semimetal: null, crossing, reason });
    }
  } else if (bs.electrons !== null && bs.electrons > 0 && occ) {
    const slots = bs.electrons / perBand;
    const whole = Math.abs(slots - Math.round(slots)) < 1e-6;
    const spinWord = bs.spinorbit
      ? 'with spinors (one electron per band)'
      : bs.nSpin === 2
        ? 'in two spin channels'
        : 'without spin polarisation (two electrons per band)';
    // A metal's Fermi level is its charge density's: one written from the self-consistent mesh is kept as written.
    const level = (): number | null => (countFirst && written !== null ? written : fillingFermiLevel(bs, bs.electrons!, perBand));
    if (!whole && bs.nSpin === 1) {
      evidence = 'count';
      fermi = level();
      fermiEstimated = fermi !== null && fermi !== written;
      const band = Math.floor(slots);
      const crossing = fermi !== null ? crossingAt(0, fermi) : [band];
      per.push({
        spin: 0,
        metal: true,
        semimetal: false,
        crossing: crossing.length ? crossing : [band],
        reason: `${bs.electrons} electrons ${spinWord} fill ${slots} bands: band ${band + 1 + offset} is partly filled.`,
      });
    } else {
      evidence = 'edges';
      for (const s of spins) {
        const o = occ.occupied[s]!;
        const e = bs.energies[s]!;
        const nb = bs.nBands;
        let top = -Infinity;
        let bottom = Infinity;
        const partial: number[] = [];
        for (let b = 0; b < nb; b++) {
          let any = false;
          let none = false;
          for (let k = 0; k < bs.nk; k++) {
            const i = k * nb + b;
            if (o[i]) {
              any = true;
              top = Math.max(top, e[i]!);
            } else {
              none = true;
              bottom = Math.min(bottom, e[i]!);
            }
          }
          if (any && none) partial.push(b);
        }
        const overlap = Number.isFinite(top) && Number.isFinite(bottom) && top >= bottom - LEVEL_EV;
        const metal = partial.length > 0 || overlap;
        let crossing = partial;
        let reason: string;
        if (!metal)
          reason = `${bs.electrons} electrons ${spinWord} fill whole bands, and the highest filled state lies below the lowest empty one.`;
        else {
          const ef = level();
          if (ef !== null) {
            fermi = ef;
            fermiEstimated = ef !== written;
            crossing = crossingAt(s, ef);
          }
          reason = `${bs.electrons} electrons ${spinWord} fill whole bands, but the highest filled state (${eV(top)}) lies at or above the lowest empty one (${eV(bottom)}).`;
        }
        per.push({ spin: s as 0 | 1, metal, semimetal: null, crossing, reason });
      }
      if (!whole && bs.nSpin === 2) {
        // A non-integer count in two channels: at least one channel is partly filled.
        evidence = 'count';
        for (const v of per) v.reason = `${bs.electrons} electrons do not fill whole bands of the two spin channels. ${v.reason}`;
        if (!per.some((v) => v.metal)) per.forEach((v) => (v.metal = true));
      }
    }
  } else {
    for (const s of spins) {
      per.push({
        spin: s as 0 | 1,
        metal: null,
        semimetal: null,
        crossing: [],
        reason:
          'Neither occupations, a Fermi energy nor an electron count is known: whether a band crosses the Fermi level cannot be told.',
      });
    }
  }

  // Metals: the Fermi level (written or estimated), the crossing bands there, and the semimetal test.
  for (const v of per) {
    if (!v.metal) {
      if (v.metal === false) v.semimetal = false;
      continue;
    }
    if (v.crossing.length === 0 && fermi !== null) v.crossing = crossingAt(v.spin, fermi);
    const n = wholeBandsPerChannel(bs, occ, evidence === 'occupations' ? fractionsOf()[v.spin]! : null);
    const sm = semimetalVerdict(bs, v.spin, v.crossing, n);
    if (v.semimetal === null || v.semimetal === undefined) v.semimetal = sm.semimetal;
    v.reason += sm.detail;
  }

  // Disagreements with weaker evidence are worth a word.
  if (evidence === 'occupations' || evidence === 'fermi') {
    if (bs.electrons !== null && bs.nSpin === 1 && !per[0]!.metal) {
      const slots = bs.electrons / perBand;
      if (Math.abs(slots - Math.round(slots)) > 1e-6) {
        warnings.push(
          `${bs.electrons} electrons cannot fill whole bands (${slots} bands), yet the ${evidence === 'occupations' ? 'occupations' : 'Fermi energy'} of the file show no band crossing the Fermi level: check the electron count.`,
        );
      }
    }
  }
  if (evidence === 'occupations' && written !== null) {
    const inside = spins.some((s) => crossingAt(s, written).length > 0);
    const metalNow = per.some((v) => v.metal);
    if (inside && !metalNow && bs.fermiSource !== 'highestOccupiedLevel') {
      warnings.push(
        `The Fermi energy the file writes (${eV(written)}) lies inside a band's range, but the occupations fill whole bands: the occupations were followed.`,
      );
    }
  }

  if (countFirst && bs.occupations && !per.some((v) => v.metal)) {
    // Occupations written from that Fermi energy: a band they leave partly empty where the count fills it.
    const marked = bs.occupations.map((o) => new Uint8Array(o.length));
    markFilled(bs.occupations, bs.nBands, marked);
    const differ = new Set<number>();
    marked.forEach((m, s) => {
      const o = occ.occupied[s]!;
      for (let i = 0; i < m.length; i++) if (m[i] !== o[i]) differ.add(i % bs.nBands);
    });
    if (differ.size > 0) {
      warnings.push(
        `The occupations written on these k-points follow from a Fermi energy fixed on the self-consistent mesh and differ from whole bands for ${bandList(
          [...differ].sort((a, b) => a - b),
          offset,
        )}: the electron count was followed (the mesh may miss a band edge these k-points reach).`,
      );
    }
  } else if (countFirst && written !== null) {
    const inside = spins.filter((s) => !per[s]!.metal && crossingAt(s, written).length > 0);
    if (inside.length > 0) {
      warnings.push(
        `The Fermi energy the file writes (${eV(written)}) was found on the self-consistent k-points, not on these, and lies inside ${bandList(crossingAt(inside[0]!, written), offset)}'s range here: the electron count was followed (the self-consistent mesh may miss a band edge these k-points reach).`,
      );
    }
  }

  const anyNull = per.some((v) => v.metal === null);
  const metal = anyNull ? null : per.some((v) => v.metal);
  const metals = per.filter((v) => v.metal);
  const semimetal =
    metal === null
      ? null
      : !metal
        ? false
        : metals.every((v) => v.semimetal === true)
          ? true
          : metals.some((v) => v.semimetal === null)
            ? null
            : false;
  let reason: string;
  if (per.length === 1) reason = per[0]!.reason;
  else {
    const word = (v: ChannelVerdict): string =>
      v.metal === null ? 'undetermined' : v.semimetal ? 'semimetallic' : v.metal ? 'metallic' : 'gapped';
    reason = `Spin up is ${word(per[0]!)}, spin down ${word(per[1]!)}${metal && per.some((v) => v.metal === false) ? ' (a half-metal)' : ''}. ${per.map((v, i) => `${i === 0 ? 'Up' : 'Down'}: ${v.reason}`).join(' ')}`;
  }
  if (metal && fermi !== null && fermiEstimated) {
    reason += ` The file writes no Fermi energy: it was estimated at ${eV(fermi)} from the ${evidence === 'occupations' ? 'occupations' : 'electron count filling the sampled states'}.`;
  }
  return {
    metal,
    semimetal,
    fermi_eV: metal ? fermi : written,
    fermiEstimated: metal ? fermiEstimated : false,
    evidence,
    reason,
    spins: per,
    warnings,
  };
}
