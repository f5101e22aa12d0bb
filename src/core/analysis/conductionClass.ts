/**
 * Insulator, metal or semimetal: one verdict per spin channel and overall, from the strongest evidence the
 * run's files hold, in this order (physics.md, "Metals, semimetals and smearing": common practice):
 *   1. occupations: a band filled (above half of full) at some k and empty (below half) at others, or a state
 *      clearly partly filled; smearing tails (1e-4 and below, up to TAIL_LIMIT) are not partial filling;
 *   2. the Fermi energy the file writes: inside the energy range a band spans over the sampled k;
 *   3. the electron count: it cannot fill whole bands (odd without spin polarisation or spinors; non-integer);
 *   4. band order at the edges: the highest filled state at or above the lowest empty one.
 * A semimetal is a metal whose overlap is between two distinct bands, the lower with hole pockets and the upper
 * with electron pockets, the electron count filling a whole number of bands.
 * Pure: no I/O.
 */
import type { BandStructure } from '../model';
import type { OccupationRule } from './occupation';

/** Which evidence decided. */
export type ClassEvidence = 'occupations' | 'fermi' | 'count' | 'edges' | 'none';

/** Occupation fractions this close to 0 or 1 are smearing tails, not partial filling. */
export const TAIL_LIMIT = 0.05;
/** A written Fermi energy this close to a band's extreme value counts as at the edge, not inside (eV). */
export const FERMI_INSIDE_TOLERANCE_EV = 2e-3;
/** Two bands closer than this at some k touch or cross: not "clearly distinct" (eV). */
export const DISTINCT_BANDS_EV = 0.01;
/** Energies within this of each other are one level (eV), as in gap.ts. */
const LEVEL_EV = 1e-4;

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

/** Normalised k weights (equal when the file gives none, or none that sum to a positive number). */
function kWeights(bs: BandStructure): Float64Array {
  const w = new Float64Array(bs.nk);
  let sum = 0;
  if (bs.weights) for (let k = 0; k < bs.nk; k++) sum += Math.max(0, bs.weights[k]!);
  for (let k = 0; k < bs.nk; k++) w[k] = sum > 0 ? Math.max(0, bs.weights![k]!) / sum : 1 / bs.nk;
  return w;
}

/** "band 3" / "bands 3 and 4", numbered as the user sees them (from offset + 1, offset = the file's numbering). */
const bandList = (bands: number[], offset: number): string => {
  const b = bands.map((x) => x + 1 + offset);
  return b.length === 1 ? `band ${b[0]}` : `bands ${b.slice(0, -1).join(', ')} and ${b[b.length - 1]}`;
};
const eV = (x: number): string => `${x.toFixed(4)} eV`;

/** Electrons per band of one channel. */
function electronsPerBand(bs: BandStructure, occ: OccupationRule | null): 1 | 2 {
  return occ?.perBand ?? (bs.nSpin === 1 && !bs.spinorbit ? 2 : 1);
}

/**
 * The Fermi level that fills `electrons` into the sampled states (k weights normalised), by bisection on the
 * counting function: an estimate, exact only as the sampling becomes dense.
 */
export function fillingFermiLevel(bs: BandStructure, electrons: number, perBand: 1 | 2): number | null {
  if (!(electrons > 0) || bs.nk === 0) return null;
  const w = kWeights(bs);
  let lo = Infinity;
  let hi = -Infinity;
  for (const e of bs.energies)
    for (let i = 0; i < e.length; i++) {
      if (e[i]! < lo) lo = e[i]!;
      if (e[i]! > hi) hi = e[i]!;
    }
  const count = (ef: number): number => {
    let n = 0;
    for (const e of bs.energies)
      for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) if (e[k * bs.nBands + b]! <= ef) n += w[k]! * perBand;
    return n;
  };
  if (count(hi) < electrons - 1e-9) return null;
  // Smallest level holding the electrons, then the midpoint to the next state above it.
  for (let it = 0; it < 80; it++) {
    const mid = 0.5 * (lo + hi);
    if (count(mid) >= electrons - 1e-9) hi = mid;
    else lo = mid;
  }
  let next = Infinity;
  for (const e of bs.energies) for (let i = 0; i < e.length; i++) if (e[i]! > hi + LEVEL_EV && e[i]! < next) next = e[i]!;
  return Number.isFinite(next) ? 0.5 * (hi + next) : hi;
}

/** Whole bands per channel the electrons fill, when they fill a whole number; null otherwise. */
function wholeBandsPerChannel(bs: BandStructure, occ: OccupationRule | null, spin: number, fractions: Float64Array | null): number | null {
  const perBand = electronsPerBand(bs, occ);
  if (bs.nSpin === 1 && bs.electrons !== null) {
    const slots = bs.electrons / perBand;
    return Math.abs(slots - Math.round(slots)) < 1e-6 ? Math.round(slots) : null;
  }
  // Spin-polarised (or no count): the channel's own filling, from its occupations (k-weighted mean).
  if (!fractions) return null;
  const w = kWeights(bs);
  let n = 0;
  for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) n += w[k]! * fractions[k * bs.nBands + b]!;
  void spin;
  return Math.abs(n - Math.round(n)) < 0.05 ? Math.round(n) : null;
}

/**
 * Semimetal test for one channel of a metal: exactly bands n−1 and n cross (n whole bands filled), band n−1
 * dips above E_F (hole pockets), band n below (electron pockets), and the two never touch.
 */
function semimetalVerdict(
  bs: BandStructure,
  spin: number,
  crossing: number[],
  nFilled: number | null,
): { semimetal: boolean | null; detail: string } {
  const offset = bs.bandNumberOffset ?? 0;
  // Two adjacent bands must cross; whether they hold whole bands' worth of electrons needs the count.
  if (crossing.length !== 2 || crossing[1] !== crossing[0]! + 1) return { semimetal: false, detail: '' };
  if (nFilled === null) {
    return {
      semimetal: null,
      detail: ` Bands ${crossing[0]! + 1 + offset} and ${crossing[1] + 1 + offset} both cross the Fermi level; without the electron count, whether this is a semimetal (whole bands filled, electron and hole pockets) cannot be told.`,
    };
  }
  const lower = nFilled - 1;
  const upper = nFilled;
  if (crossing[0] !== lower || upper >= bs.nBands || lower < 0) return { semimetal: false, detail: '' };
  const e = bs.energies[spin]!;
  const nb = bs.nBands;
  let closest = Infinity;
  let lowerMax = -Infinity;
  let upperMin = Infinity;
  for (let k = 0; k < bs.nk; k++) {
    const a = e[k * nb + lower]!;
    const c = e[k * nb + upper]!;
    closest = Math.min(closest, c - a);
    lowerMax = Math.max(lowerMax, a);
    upperMin = Math.min(upperMin, c);
  }
  if (closest < DISTINCT_BANDS_EV) {
    return {
      semimetal: false,
      detail: ` Bands ${lower + 1 + offset} and ${upper + 1 + offset} touch or cross (${(closest * 1000).toFixed(1)} meV apart at closest), so the overlap is not between distinct bands.`,
    };
  }
  return {
    semimetal: true,
    detail: ` Semimetal: band ${lower + 1 + offset} has hole pockets and band ${upper + 1 + offset} electron pockets; they overlap by ${eV(lowerMax - upperMin)} (a negative indirect gap of ${eV(upperMin - lowerMax)}).`,
  };
}

/** Occupation fractions (0..1 of a full state) per channel, as the file writes them. */
function occupationFractions(bs: BandStructure): Float64Array[] {
  let maxOcc = 0;
  for (const o of bs.occupations!) for (let i = 0; i < o.length; i++) if (o[i]! > maxOcc) maxOcc = o[i]!;
  // Files write fractions (0..1, Methfessel-Paxton slightly beyond) or electrons (0..2).
  const full = maxOcc > 1.5 ? 2 : 1;
  // A plain loop: TypedArray.from with a mapping function goes through a JS list of every value on the way
  // (tens of MB of heap on a large run).
  return bs.occupations!.map((o) => {
    const f = new Float64Array(o.length);
    for (let i = 0; i < o.length; i++) f[i] = o[i]! / full;
    return f;
  });
}

export function classifyConduction(bs: BandStructure, occ: OccupationRule | null): ConductionClass {
  const offset = bs.bandNumberOffset ?? 0;
  const warnings: string[] = [];
  const spins = Array.from({ length: bs.nSpin }, (_, s) => s);
  const ranges = spins.map((s) => bandRanges(bs, s));
  const perBand = electronsPerBand(bs, occ);
  const written = bs.fermiEnergy;
  const per: ChannelVerdict[] = [];
  let evidence: ClassEvidence = 'none';
  let fermi: number | null = written;
  let fermiEstimated = false;
  let fractions: Float64Array[] | null = null;

  const crossingAt = (s: number, ef: number): number[] =>
    ranges[s]!.flatMap((r, b) => (r.min < ef - FERMI_INSIDE_TOLERANCE_EV && r.max > ef + FERMI_INSIDE_TOLERANCE_EV ? [b] : []));

  if (occ && occ.basis === 'occupations' && bs.occupations) {
    evidence = 'occupations';
    fractions = occupationFractions(bs);
    let largestTail = 0;
    let maxFilled = -Infinity;
    let minEmpty = Infinity;
    for (const s of spins) {
      const f = fractions[s]!;
      const e = bs.energies[s]!;
      const nb = bs.nBands;
      const crossing: number[] = [];
      const straddling: number[] = [];
      let partlyFilled: { band: number; value: number; dev: number } | null = null;
      for (let b = 0; b < nb; b++) {
        let above = false;
        let below = false;
        let partial = false;
        for (let k = 0; k < bs.nk; k++) {
          const x = f[k * nb + b]!;
          if (x > 0.5) above = true;
          else below = true;
          const dev = Math.min(Math.abs(x), Math.abs(x - 1));
          if (dev > TAIL_LIMIT) {
            partial = true;
            if (!partlyFilled || dev > partlyFilled.dev) partlyFilled = { band: b, value: x, dev };
          } else if (dev > largestTail) largestTail = dev;
          const en = e[k * nb + b]!;
          if (x > 0.5) maxFilled = Math.max(maxFilled, en);
          else minEmpty = Math.min(minEmpty, en);
        }
        if (above && below) straddling.push(b);
        if ((above && below) || partial) crossing.push(b);
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
        reason = `The occupations show ${bandList(crossing, offset)} partly filled (occupation ${partlyFilled!.value.toFixed(2)} of a full state): states lie at the Fermi level.`;
      per.push({ spin: s as 0 | 1, metal, semimetal: null, crossing, reason });
    }
    if (largestTail > 1e-4 && !per.some((v) => v.metal)) {
      warnings.push(
        `Smearing tails reach ${largestTail.toExponential(1)} of a full state: partly filled states below ${TAIL_LIMIT} were read as tails, not as a metal.`,
      );
    }
    if (fermi === null && Number.isFinite(maxFilled) && Number.isFinite(minEmpty)) {
      fermi = maxFilled < minEmpty ? 0.5 * (maxFilled + minEmpty) : fillingFermiLevel(bs, totalElectrons(bs, fractions, perBand), perBand);
      fermiEstimated = fermi !== null;
    }
  } else if (written !== null) {
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
    if (!whole && bs.nSpin === 1) {
      evidence = 'count';
      fermi = fillingFermiLevel(bs, bs.electrons, perBand);
      fermiEstimated = fermi !== null;
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
          const ef = fillingFermiLevel(bs, bs.electrons, perBand);
          if (ef !== null) {
            fermi = ef;
            fermiEstimated = true;
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
    const n = wholeBandsPerChannel(bs, occ, v.spin, fractions ? fractions[v.spin]! : null);
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

function totalElectrons(bs: BandStructure, fractions: Float64Array[], perBand: 1 | 2): number {
  const w = kWeights(bs);
  let n = 0;
  for (const f of fractions)
    for (let k = 0; k < bs.nk; k++) for (let b = 0; b < bs.nBands; b++) n += w[k]! * perBand * f[k * bs.nBands + b]!;
  return n;
}
