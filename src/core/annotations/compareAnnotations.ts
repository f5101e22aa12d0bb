/**
 * What differs between two annotations documents (an older one and one built from a newer analysis), as
 * changes a person can read: "CBM, band 5, …: energy 0.6123 eV → 0.5623 eV (−50.0 meV)". With tolerances,
 * only changes beyond them are listed (drift); with EXACT_TOLERANCES every change of a written number is.
 * Numbers are compared as they are written in the file (numberFormat.ts), so float noise is never a change.
 */
import { entryTitle, type AnnotatedEntry, type AnnotatedMass, type AnnotatedSource, type AnnotationsDoc } from './annotationsModel';
import { kDistance, massKeys, matchEntries } from './matchEntries';
import { formatNumber, roundAs } from './numberFormat';
import { methodId } from '../analysis/methods';

export interface Tolerances {
  /** Energies (band energies and gaps), meV. */
  energy_meV: number;
  /** Masses (directional, tensor, averaged), per cent of the recorded value. */
  mass_percent: number;
  /** Position of an extremum, largest fractional coordinate difference. */
  k: number;
}

/** The defaults of issue 5: 1 meV for energies, 2 % for masses; k positions to 1e-4 of a reciprocal vector. */
export const DEFAULT_TOLERANCES: Tolerances = { energy_meV: 1, mass_percent: 2, k: 1e-4 };
export const EXACT_TOLERANCES: Tolerances = { energy_meV: 0, mass_percent: 0, k: 0 };

export type ChangeKind = 'changed' | 'added' | 'removed' | 'lost' | 'refound';

export interface AnnotationChange {
  scope: 'source' | 'settings' | 'gap' | 'entry';
  /** The entry id, the source path, 'gap' or 'settings'. */
  subject: string;
  kind: ChangeKind;
  /** What changed: 'energy', 'mass towards X', 'sha256', 'window_meV', ... */
  quantity: string;
  before: string | null;
  after: string | null;
  /** The difference in words, e.g. "-50.0 meV" or "+3.1 %", when it is a number. */
  delta: string | null;
  /** One sentence saying all of it. */
  message: string;
}

const EPS = 1e-9;
const signed = (x: number, digits: number): string => `${x > 0 ? '+' : x < 0 ? '−' : '±'}${Math.abs(x).toFixed(digits)}`;

class ChangeList {
  readonly items: AnnotationChange[] = [];
  constructor(readonly tol: Tolerances) {}

  private tolText(what: 'energy' | 'mass' | 'k'): string {
    if (this.tol === EXACT_TOLERANCES) return '';
    if (what === 'energy') return `; tolerance ${this.tol.energy_meV} meV`;
    if (what === 'mass') return `; tolerance ${this.tol.mass_percent} %`;
    return `; tolerance ${this.tol.k}`;
  }

  add(c: Omit<AnnotationChange, 'message'> & { message?: string }, title: string): void {
    const message = c.message ?? `${title}: ${c.quantity} ${c.before ?? 'none'} → ${c.after ?? 'none'}${c.delta ? ` (${c.delta})` : ''}`;
    this.items.push({ ...c, message });
  }

  energy(scope: AnnotationChange['scope'], subject: string, title: string, quantity: string, a: number, b: number): void {
    const x = roundAs(a, 'energy');
    const y = roundAs(b, 'energy');
    const dmeV = (y - x) * 1000;
    if (Math.abs(dmeV) <= this.tol.energy_meV + EPS || x === y) return;
    this.add(
      {
        scope,
        subject,
        kind: 'changed',
        quantity,
        before: `${formatNumber(x, 'energy')} eV`,
        after: `${formatNumber(y, 'energy')} eV`,
        delta: `${signed(dmeV, 1)} meV${this.tolText('energy')}`,
      },
      title,
    );
  }

  mass(subject: string, title: string, quantity: string, a: number | null, b: number | null): void {
    const x = a === null ? null : roundAs(a, 'mass');
    const y = b === null ? null : roundAs(b, 'mass');
    if (x === y) return;
    let delta: string | null = null;
    if (x !== null && y !== null) {
      const rel = x === 0 ? Infinity : ((y - x) / Math.abs(x)) * 100;
      if (Math.abs(rel) <= this.tol.mass_percent + EPS) return;
      delta = Number.isFinite(rel) ? `${signed(rel, 1)} %${this.tolText('mass')}` : null;
    }
    this.add(
      {
        scope: 'entry',
        subject,
        kind: 'changed',
        quantity,
        before: x === null ? null : `${formatNumber(x, 'mass')} m_e`,
        after: y === null ? null : `${formatNumber(y, 'mass')} m_e`,
        delta,
      },
      title,
    );
  }

  count(subject: string, title: string, quantity: string, a: number | null, b: number | null): void {
    if (a === b) return;
    this.add(
      {
        scope: 'entry',
        subject,
        kind: 'changed',
        quantity,
        before: a === null ? null : String(a),
        after: b === null ? null : String(b),
        delta: null,
      },
      title,
    );
  }
}

function compareMasses(list: ChangeList, e: AnnotatedEntry, a: readonly AnnotatedMass[], b: readonly AnnotatedMass[], title: string): void {
  const ka = massKeys(a);
  const kb = massKeys(b);
  const byKey = new Map(kb.map((k, i) => [k, b[i]!]));
  const name = (m: AnnotatedMass): string =>
    `mass towards ${m.towards || '(unnamed direction)'}${m.branch === null ? '' : ` (branch ${m.branch})`}`;
  ka.forEach((key, i) => {
    const m = a[i]!;
    const n = byKey.get(key);
    if (!n) {
      list.add(
        {
          scope: 'entry',
          subject: e.id,
          kind: 'removed',
          quantity: name(m),
          before: m.mass === null ? null : `${formatNumber(m.mass, 'mass')} m_e`,
          after: null,
          delta: null,
          message: `${title}: the ${name(m)} is no longer fitted`,
        },
        title,
      );
      return;
    }
    list.mass(e.id, title, name(m), m.mass, n.mass);
  });
  const inA = new Set(ka);
  kb.forEach((key, i) => {
    if (inA.has(key)) return;
    const n = b[i]!;
    list.add(
      {
        scope: 'entry',
        subject: e.id,
        kind: 'added',
        quantity: name(n),
        before: null,
        after: n.mass === null ? null : `${formatNumber(n.mass, 'mass')} m_e`,
        delta: null,
        message: `${title}: a new ${name(n)} of ${n.mass === null ? 'no finite value' : `${formatNumber(n.mass, 'mass')} m_e`}`,
      },
      title,
    );
  });
}

function compareEntry(list: ChangeList, a: AnnotatedEntry, b: AnnotatedEntry): void {
  const title = `${a.id} (${entryTitle(a)})`;
  if (!a.found) {
    list.add(
      {
        scope: 'entry',
        subject: a.id,
        kind: 'refound',
        quantity: 'found',
        before: 'false',
        after: 'true',
        delta: null,
        message: `${title}: found again by the analysis`,
      },
      title,
    );
  }
  const dk = kDistance(a.k, b.k);
  if (dk > list.tol.k + EPS && a.k.some((x, i) => formatNumber(x, 'k') !== formatNumber(b.k[i]!, 'k'))) {
    list.add(
      {
        scope: 'entry',
        subject: a.id,
        kind: 'changed',
        quantity: 'k',
        before: `(${a.k.map((x) => formatNumber(x, 'k')).join(', ')})`,
        after: `(${b.k.map((x) => formatNumber(x, 'k')).join(', ')})`,
        delta: null,
      },
      title,
    );
  }
  list.energy('entry', a.id, title, 'energy', a.energy_eV, b.energy_eV);
  list.count(a.id, title, 'valley degeneracy', a.valleyDegeneracy, b.valleyDegeneracy);
  list.count(a.id, title, 'degenerate bands', a.degenerateBands, b.degenerateBands);
  compareMasses(list, a, a.masses, b.masses, title);
  if ((a.tensor === null) !== (b.tensor === null)) {
    list.add(
      {
        scope: 'entry',
        subject: a.id,
        kind: a.tensor ? 'removed' : 'added',
        quantity: 'mass tensor',
        before: a.tensor ? 'present' : null,
        after: b.tensor ? 'present' : null,
        delta: null,
        message: `${title}: the mass tensor ${a.tensor ? 'is no longer available' : 'is now available'}`,
      },
      title,
    );
  } else if (a.tensor && b.tensor) {
    for (let i = 0; i < 3; i++) list.mass(a.id, title, `principal mass ${i + 1}`, a.tensor.principal[i]!, b.tensor.principal[i]!);
  }
  list.mass(a.id, title, 'density-of-states mass', a.dosMass, b.dosMass);
  list.mass(a.id, title, 'conductivity mass', a.conductivityMass, b.conductivityMass);
}

/** Source files: which were added, removed, or hold other bytes now. */
export function compareSources(
  older: readonly AnnotatedSource[],
  newer: readonly { path: string; sha256: string; role?: string }[],
): AnnotationChange[] {
  const out: AnnotationChange[] = [];
  const now = new Map(newer.map((s) => [s.path, s]));
  const short = (h: string): string => `${h.slice(0, 12)}…`;
  for (const s of older) {
    const n = now.get(s.path);
    if (!n) {
      out.push({
        scope: 'source',
        subject: s.path,
        kind: 'removed',
        quantity: 'sha256',
        before: short(s.sha256),
        after: null,
        delta: null,
        message: `source ${s.path} (${s.role}) is no longer read with the run (missing, or no longer used)`,
      });
    } else if (n.sha256 !== s.sha256) {
      out.push({
        scope: 'source',
        subject: s.path,
        kind: 'changed',
        quantity: 'sha256',
        before: short(s.sha256),
        after: short(n.sha256),
        delta: null,
        message: `source ${s.path} (${s.role}) has changed since the annotations were written (sha256 ${short(s.sha256)} → ${short(n.sha256)})`,
      });
    }
  }
  const then = new Set(older.map((s) => s.path));
  for (const n of newer) {
    if (!then.has(n.path)) {
      out.push({
        scope: 'source',
        subject: n.path,
        kind: 'added',
        quantity: 'sha256',
        before: null,
        after: short(n.sha256),
        delta: null,
        message: `source ${n.path}${n.role ? ` (${n.role})` : ''} is now read with the run but is not recorded in the annotations`,
      });
    }
  }
  return out;
}

export function compareSettings(older: AnnotationsDoc, newer: AnnotationsDoc): AnnotationChange[] {
  const out: AnnotationChange[] = [];
  for (const key of ['window_meV', 'method', 'range_eV', 'degeneracy_meV', 'forceSpinorbit', 'alat_angstrom', 'structureFile'] as const) {
    // A method written under its earlier name (fd3, fd5) is the same method.
    const a = key === 'method' ? (methodId(older.settings.method) ?? older.settings.method) : String(older.settings[key]);
    const b = key === 'method' ? (methodId(newer.settings.method) ?? newer.settings.method) : String(newer.settings[key]);
    if (a !== b)
      out.push({
        scope: 'settings',
        subject: 'settings',
        kind: 'changed',
        quantity: key,
        before: a,
        after: b,
        delta: null,
        message: `settings: ${key} ${a} → ${b}`,
      });
  }
  return out;
}

/** Gap and entries (the numbers a reviewer concluded on), beyond the tolerances. */
export function compareResults(older: AnnotationsDoc, newer: AnnotationsDoc, tol: Tolerances = DEFAULT_TOLERANCES): AnnotationChange[] {
  const list = new ChangeList(tol);
  if (older.metal !== newer.metal) {
    list.add(
      {
        scope: 'gap',
        subject: 'gap',
        kind: 'changed',
        quantity: 'metal',
        before: String(older.metal),
        after: String(newer.metal),
        delta: null,
        message: `the run is ${newer.metal ? 'now a metal (no gap)' : newer.metal === false ? 'now gapped' : 'no longer classified'}, was ${older.metal === null ? 'unclassified' : older.metal ? 'a metal' : 'gapped'}`,
      },
      'gap',
    );
  }
  if (older.gap && newer.gap) {
    list.energy('gap', 'gap', 'band gap', 'fundamental gap', older.gap.eV, newer.gap.eV);
    if (older.gap.direct !== newer.gap.direct) {
      list.add(
        {
          scope: 'gap',
          subject: 'gap',
          kind: 'changed',
          quantity: 'direct',
          before: String(older.gap.direct),
          after: String(newer.gap.direct),
          delta: null,
          message: `band gap: ${older.gap.direct ? 'direct' : 'indirect'} → ${newer.gap.direct ? 'direct' : 'indirect'}`,
        },
        'band gap',
      );
    }
    list.energy('gap', 'gap', 'band gap', 'smallest direct gap', older.gap.directGap.eV, newer.gap.directGap.eV);
  } else if (older.gap || newer.gap) {
    list.add(
      {
        scope: 'gap',
        subject: 'gap',
        kind: older.gap ? 'removed' : 'added',
        quantity: 'fundamental gap',
        before: older.gap ? `${formatNumber(older.gap.eV, 'energy')} eV` : null,
        after: newer.gap ? `${formatNumber(newer.gap.eV, 'energy')} eV` : null,
        delta: null,
      },
      'band gap',
    );
  }
  const m = matchEntries(older.entries, newer.entries);
  for (const [i, j] of m.pairs) compareEntry(list, older.entries[i]!, newer.entries[j]!);
  for (const i of m.onlyOld) {
    const e = older.entries[i]!;
    if (!e.found) continue; // already recorded as not found
    list.add(
      {
        scope: 'entry',
        subject: e.id,
        kind: 'lost',
        quantity: 'found',
        before: 'true',
        after: 'false',
        delta: null,
        message: `${e.id} (${entryTitle(e)}): no longer found by the analysis`,
      },
      e.id,
    );
  }
  for (const j of m.onlyNew) {
    const e = newer.entries[j]!;
    list.add(
      {
        scope: 'entry',
        subject: e.id,
        kind: 'added',
        quantity: 'entry',
        before: null,
        after: `${formatNumber(e.energy_eV, 'energy')} eV`,
        delta: null,
        message: `${e.id} (${entryTitle(e)}): found by the analysis at ${formatNumber(e.energy_eV, 'energy')} eV but not in the annotations`,
      },
      e.id,
    );
  }
  return list.items;
}

/** Everything that differs: sources, settings, and results beyond the tolerances. */
export function compareAnnotations(older: AnnotationsDoc, newer: AnnotationsDoc, tol: Tolerances = DEFAULT_TOLERANCES): AnnotationChange[] {
  return [...compareSources(older.sources, newer.sources), ...compareSettings(older, newer), ...compareResults(older, newer, tol)];
}
