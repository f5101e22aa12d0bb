/**
 * A Report back from its JSON contract (a line written by `analyze --jsonl`), checked field by field: the
 * file may come from anywhere, so every field `compare` uses is verified before it is trusted. Numbers are
 * as the contract rounded them; a standard error written as null (not known) becomes NaN again. Fields this
 * reader does not know are carried over as they are.
 */
import type { BandPoint, ExtremumReport, GapReport, Mat3, MassFit, MassTensor, Report, Vec3 } from '../../core/model';
import { ValleyscopeError } from '../../core/errors';

type Obj = Record<string, unknown>;

export class JsonShape {
  constructor(readonly where: string) {}

  fail(field: string, expected: string): never {
    throw new ValleyscopeError(`${this.where}: "${field}" should be ${expected}`);
  }
  obj(v: unknown, field: string): Obj {
    if (typeof v !== 'object' || v === null || Array.isArray(v)) this.fail(field, 'an object');
    return v as Obj;
  }
  arr(v: unknown, field: string): unknown[] {
    if (!Array.isArray(v)) this.fail(field, 'an array');
    return v;
  }
  num(v: unknown, field: string): number {
    if (typeof v !== 'number') this.fail(field, 'a number');
    return v;
  }
  /** A number, or null for "not known" (NaN), as the JSON contract writes non-finite values. */
  numOrNaN(v: unknown, field: string): number {
    if (v === null) return Number.NaN;
    return this.num(v, field);
  }
  numOrNull(v: unknown, field: string): number | null {
    return v === null ? null : this.num(v, field);
  }
  int(v: unknown, field: string, min: number, max: number): number {
    if (typeof v !== 'number' || !Number.isInteger(v) || v < min || v > max) this.fail(field, `a whole number from ${min} to ${max}`);
    return v;
  }
  str(v: unknown, field: string): string {
    if (typeof v !== 'string') this.fail(field, 'a string');
    return v;
  }
  strOrNull(v: unknown, field: string): string | null {
    return v === null ? null : this.str(v, field);
  }
  bool(v: unknown, field: string): boolean {
    if (typeof v !== 'boolean') this.fail(field, 'true or false');
    return v;
  }
  boolOrNull(v: unknown, field: string): boolean | null {
    return v === null ? null : this.bool(v, field);
  }
  strings(v: unknown, field: string): string[] {
    return this.arr(v, field).map((x, i) => this.str(x, `${field}[${i}]`));
  }
  vec3(v: unknown, field: string): Vec3 {
    const a = this.arr(v, field);
    if (a.length !== 3) this.fail(field, 'three numbers');
    return [this.numOrNaN(a[0], field), this.numOrNaN(a[1], field), this.numOrNaN(a[2], field)];
  }
  /** Three rows of three finite numbers (a lattice, a rotation). */
  finiteMat3(v: unknown, field: string): Mat3 {
    const m = this.mat3(v, field);
    if (!m.every((row) => row.every((x) => Number.isFinite(x)))) this.fail(field, 'three rows of three finite numbers');
    return m;
  }
  mat3(v: unknown, field: string): Mat3 {
    const a = this.arr(v, field);
    if (a.length !== 3) this.fail(field, 'three rows of three numbers');
    return [this.vec3(a[0], field), this.vec3(a[1], field), this.vec3(a[2], field)];
  }
}

const MAX_COUNT = 2 ** 31;

function point(c: JsonShape, v: unknown, f: string): BandPoint {
  const o = c.obj(v, f);
  const spin = c.int(o.spin, `${f}.spin`, 0, 1) as 0 | 1;
  return {
    band: c.int(o.band, `${f}.band`, 1, MAX_COUNT),
    spin,
    k: c.vec3(o.k, `${f}.k`),
    eV: c.num(o.eV, `${f}.eV`),
    label: c.strOrNull(o.label, `${f}.label`),
  };
}

function gap(c: JsonShape, v: unknown, f: string): GapReport | null {
  if (v === null) return null;
  const o = c.obj(v, f);
  const d = c.obj(o.directGap, `${f}.directGap`);
  return {
    ...o,
    eV: c.num(o.eV, `${f}.eV`),
    direct: c.bool(o.direct, `${f}.direct`),
    vbm: point(c, o.vbm, `${f}.vbm`),
    cbm: point(c, o.cbm, `${f}.cbm`),
    directGap: { eV: c.num(d.eV, `${f}.directGap.eV`), k: c.vec3(d.k, `${f}.directGap.k`) },
  };
}

function mass(c: JsonShape, v: unknown, f: string): MassFit {
  const o = c.obj(v, f);
  const m: MassFit = {
    ...o,
    towards: c.str(o.towards, `${f}.towards`),
    direction: c.vec3(o.direction, `${f}.direction`),
    mass: c.numOrNaN(o.mass, `${f}.mass`),
    // Lines written before masses carried the flag: quotable as they were printed.
    determined: o.determined === undefined ? true : c.bool(o.determined, `${f}.determined`),
    stderr: c.numOrNaN(o.stderr, `${f}.stderr`),
    points: c.int(o.points, `${f}.points`, 0, MAX_COUNT),
    window_meV: c.num(o.window_meV, `${f}.window_meV`),
    method: c.str(o.method, `${f}.method`),
  };
  if (o.alpha_per_eV !== undefined) m.alpha_per_eV = c.numOrNaN(o.alpha_per_eV, `${f}.alpha_per_eV`);
  if (o.residual_meV !== undefined) m.residual_meV = c.numOrNaN(o.residual_meV, `${f}.residual_meV`);
  if (o.branch !== undefined) m.branch = c.int(o.branch, `${f}.branch`, 1, MAX_COUNT);
  if (o.warnings !== undefined) m.warnings = c.strings(o.warnings, `${f}.warnings`);
  return m;
}

function tensor(c: JsonShape, v: unknown, f: string): MassTensor | null {
  if (v === null) return null;
  const o = c.obj(v, f);
  const t: MassTensor = {
    ...o,
    principal: c.vec3(o.principal, `${f}.principal`),
    axes: c.mat3(o.axes, `${f}.axes`),
    method: c.str(o.method, `${f}.method`),
  };
  if (o.points !== undefined) t.points = c.int(o.points, `${f}.points`, 0, MAX_COUNT);
  if (o.residual_meV !== undefined) t.residual_meV = c.numOrNaN(o.residual_meV, `${f}.residual_meV`);
  if (o.stderr !== undefined) t.stderr = c.vec3(o.stderr, `${f}.stderr`);
  return t;
}

const KINDS = new Set(['vbm', 'cbm', 'valley', 'peak']);

function extremum(c: JsonShape, v: unknown, f: string): ExtremumReport {
  const o = c.obj(v, f);
  const kind = c.str(o.kind, `${f}.kind`);
  if (!KINDS.has(kind)) c.fail(`${f}.kind`, 'one of vbm, cbm, valley, peak');
  return {
    ...o,
    ...point(c, o, f),
    kind: kind as ExtremumReport['kind'],
    offset_eV: c.num(o.offset_eV, `${f}.offset_eV`),
    degenerateBands: c.int(o.degenerateBands, `${f}.degenerateBands`, 1, MAX_COUNT),
    valleyDegeneracy: o.valleyDegeneracy === null ? null : c.int(o.valleyDegeneracy, `${f}.valleyDegeneracy`, 0, MAX_COUNT),
    masses: c.arr(o.masses, `${f}.masses`).map((m, i) => mass(c, m, `${f}.masses[${i}]`)),
    tensor: tensor(c, o.tensor, `${f}.tensor`),
    dosMass: c.numOrNull(o.dosMass, `${f}.dosMass`),
    conductivityMass: c.numOrNull(o.conductivityMass, `${f}.conductivityMass`),
    warnings: c.strings(o.warnings, `${f}.warnings`),
  };
}

/** The Report a `--json` object describes (keys `path`, `lattice`, `rotations` of a JSON Lines record are left out). */
export function reportFromJson(v: unknown, where: string): Report {
  const c = new JsonShape(where);
  const { path: _path, lattice: _lattice, rotations: _rotations, ...o } = c.obj(v, 'record');
  const rep: Report = {
    ...o,
    file: c.str(o.file, 'file'),
    format: c.str(o.format, 'format'),
    nk: c.int(o.nk, 'nk', 0, MAX_COUNT),
    nbands: c.int(o.nbands, 'nbands', 0, MAX_COUNT),
    nspin: c.int(o.nspin, 'nspin', 1, 2),
    electrons: c.numOrNull(o.electrons, 'electrons'),
    metal: c.boolOrNull(o.metal, 'metal'),
    semimetal: o.semimetal === undefined ? null : c.boolOrNull(o.semimetal, 'semimetal'),
    fermi_eV: o.fermi_eV === undefined ? null : c.numOrNull(o.fermi_eV, 'fermi_eV'),
    classificationReason: o.classificationReason === undefined ? '' : c.str(o.classificationReason, 'classificationReason'),
    spinors: o.spinors === undefined ? false : c.bool(o.spinors, 'spinors'),
    gap: gap(c, o.gap, 'gap'),
    extrema: c.arr(o.extrema, 'extrema').map((e, i) => extremum(c, e, `extrema[${i}]`)),
    warnings: c.strings(o.warnings, 'warnings'),
    cautions: c.strings(o.cautions, 'cautions'),
  };
  if (o.gapReason !== undefined) rep.gapReason = c.str(o.gapReason, 'gapReason');
  if (o.crossingBands !== undefined)
    rep.crossingBands = c.arr(o.crossingBands, 'crossingBands').map((b, i) => c.int(b, `crossingBands[${i}]`, 1, MAX_COUNT));
  if (o.spinGaps !== undefined) rep.spinGaps = c.arr(o.spinGaps, 'spinGaps').map((g, i) => gap(c, g, `spinGaps[${i}]`));
  return rep;
}
