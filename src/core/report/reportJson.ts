/**
 * The JSON shape of a Report (the CLI contract): plain objects with keys in a fixed order, numbers rounded
 * to what the quantity can carry so output is stable.
 */
import type { BandPoint, ExtremumReport, GapReport, MassFit, MassTensor, RejectedCandidate, Report } from '../model';

const r = (x: number, digits: number): number => {
  if (!Number.isFinite(x)) return x;
  const v = Number(x.toPrecision(digits));
  return Object.is(v, -0) ? 0 : v;
};
const e6 = (x: number): number => {
  const v = Math.round(x * 1e6) / 1e6;
  return Object.is(v, -0) ? 0 : v;
};
const kvec = (k: readonly number[]): number[] => k.map((x) => e6(x));

export function pointJson(p: BandPoint): Record<string, unknown> {
  return { band: p.band, spin: p.spin, k: kvec(p.k), eV: e6(p.eV), label: p.label };
}

export function gapJson(g: GapReport | null): Record<string, unknown> | null {
  if (!g) return null;
  return {
    eV: e6(g.eV),
    direct: g.direct,
    vbm: pointJson(g.vbm),
    cbm: pointJson(g.cbm),
    directGap: { eV: e6(g.directGap.eV), k: kvec(g.directGap.k) },
  };
}

export function massJson(m: MassFit): Record<string, unknown> {
  const o: Record<string, unknown> = {
    towards: m.towards,
    direction: m.direction.map((x) => r(x, 8)),
    mass: r(m.mass, 6),
    stderr: r(m.stderr, 3),
    points: m.points,
    window_meV: r(m.window_meV, 6),
    method: m.method,
  };
  if (m.alpha_per_eV !== undefined) o.alpha_per_eV = r(m.alpha_per_eV, 6);
  if (m.residual_meV !== undefined) o.residual_meV = r(m.residual_meV, 3);
  if (m.branch !== undefined) o.branch = m.branch;
  o.determined = m.determined;
  if (!m.determined && m.undeterminedReason) o.undeterminedReason = m.undeterminedReason;
  if (m.warnings && m.warnings.length) o.warnings = m.warnings;
  return o;
}

export function tensorJson(t: MassTensor | null): Record<string, unknown> | null {
  if (!t) return null;
  const o: Record<string, unknown> = {
    principal: t.principal.map((x) => r(x, 6)),
    axes: t.axes.map((a) => a.map((x) => r(x, 8))),
    method: t.method,
  };
  if (t.points !== undefined) o.points = t.points;
  if (t.residual_meV !== undefined) o.residual_meV = r(t.residual_meV, 3);
  if (t.stderr !== undefined) o.stderr = t.stderr.map((x) => r(x, 3));
  return o;
}

export function extremumJson(e: ExtremumReport): Record<string, unknown> {
  return {
    ...pointJson(e),
    kind: e.kind,
    offset_eV: e6(e.offset_eV),
    degenerateBands: e.degenerateBands,
    valleyDegeneracy: e.valleyDegeneracy,
    masses: e.masses.map(massJson),
    tensor: tensorJson(e.tensor),
    dosMass: e.dosMass === null ? null : r(e.dosMass, 6),
    conductivityMass: e.conductivityMass === null ? null : r(e.conductivityMass, 6),
    warnings: e.warnings,
  };
}

export function rejectedJson(x: RejectedCandidate): Record<string, unknown> {
  return { band: x.band, spin: x.spin, k: kvec(x.k), eV: e6(x.eV), reason: x.reason, detail: x.detail };
}

export function reportToJson(rep: Report): Record<string, unknown> {
  const o: Record<string, unknown> = {
    file: rep.file,
    format: rep.format,
    nk: rep.nk,
    nbands: rep.nbands,
    nspin: rep.nspin,
    electrons: rep.electrons,
    metal: rep.metal,
    gap: gapJson(rep.gap),
    extrema: rep.extrema.map(extremumJson),
  };
  if (rep.spinGaps) o.spinGaps = rep.spinGaps.map(gapJson);
  if (rep.rejected) o.rejected = rep.rejected.map(rejectedJson);
  o.warnings = rep.warnings;
  o.cautions = rep.cautions;
  return o;
}
