/**
 * The JSON shape of a Report (the CLI contract): plain objects with keys in a fixed order, numbers rounded
 * to what the quantity can carry so output is stable.
 */
import type {
  BandPoint,
  ExtremumReport,
  GapReport,
  InterpolatedExtremumInfo,
  MassFit,
  MassTensor,
  RejectedCandidate,
  Report,
  WarpingFitReport,
} from '../model';

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
  const o: Record<string, unknown> = { band: p.band, spin: p.spin, k: kvec(p.k), eV: e6(p.eV), label: p.label };
  if (p.position !== undefined) o.position = p.position;
  return o;
}

export function gapJson(g: GapReport | null): Record<string, unknown> | null {
  if (!g) return null;
  return {
    eV: e6(g.eV),
    direct: g.direct,
    vbm: pointJson(g.vbm),
    cbm: pointJson(g.cbm),
    directGap: { eV: e6(g.directGap.eV), k: kvec(g.directGap.k) },
    ...(g.source ? { source: g.source, uncertainty_eV: g.uncertainty_eV == null ? null : r(g.uncertainty_eV, 3) } : {}),
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
  // A finite difference's uncertainty to quote (its stderr is the rounding alone): the spread against the parabola.
  if (m.methodSpread) {
    const s = m.methodSpread;
    o.methodSpread = { against: s.against, mass: r(s.mass, 6), window_meV: r(s.window_meV, 6), spread: r(s.spread, 3) };
  }
  o.determined = m.determined;
  if (!m.determined && m.undeterminedReason) o.undeterminedReason = m.undeterminedReason;
  if (m.warnings && m.warnings.length) o.warnings = m.warnings;
  if (m.source) o.source = m.source;
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
  if (t.source) {
    o.source = t.source;
    o.determined = t.determined ?? true;
    if (t.determined === false && t.undeterminedReason) o.undeterminedReason = t.undeterminedReason;
  }
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
    ...(e.dosMassPathLimited ? { dosMassPathLimited: { error: r(e.dosMassPathLimited.error, 4) } } : {}),
    ...(e.warping ? { warping: warpingJson(e.warping) } : {}),
    ...(e.interpolated ? { interpolated: interpolatedJson(e.interpolated) } : {}),
    warnings: e.warnings,
  };
}

/** The warped-band fit: `{A, B, C, unit}` first, then errors and the masses that follow from it. */
export function warpingJson(w: WarpingFitReport): Record<string, unknown> {
  const side = (b: WarpingFitReport['heavy']): Record<string, unknown> => ({
    m100: r(b.m100, 6),
    m110: r(b.m110, 6),
    m111: r(b.m111, 6),
    dos: b.dos === null ? null : r(b.dos, 6),
  });
  return {
    A: r(w.A, 6),
    B: r(w.B, 6),
    C: r(w.C, 6),
    unit: w.unit,
    stderr: { A: r(w.stderr.A, 3), B: r(w.stderr.B, 3), C: r(w.stderr.C, 3) },
    points: w.points,
    residual_meV: r(w.residual_meV, 3),
    heavy: side(w.heavy),
    light: side(w.light),
  };
}

/** What the interpolation adds to an extremum of a mesh run. */
export function interpolatedJson(x: InterpolatedExtremumInfo): Record<string, unknown> {
  const u = (v: number | null): number | null => (v === null ? null : r(v, 3));
  return {
    energyUncertainty_eV: u(x.energyUncertainty_eV),
    positionUncertainty_invA: u(x.positionUncertainty_invA),
    resolved: x.resolved,
    touchingBands: x.touchingBands,
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
    semimetal: rep.semimetal,
    fermi_eV: rep.fermi_eV === null ? null : e6(rep.fermi_eV),
    classificationReason: rep.classificationReason,
    spinors: rep.spinors,
    gap: gapJson(rep.gap),
    extrema: rep.extrema.map(extremumJson),
  };
  if (rep.crossingBands) o.crossingBands = rep.crossingBands;
  if (rep.gapReason) o.gapReason = rep.gapReason;
  if (rep.spinGaps) o.spinGaps = rep.spinGaps.map(gapJson);
  if (rep.spinChannels) {
    o.spinChannels = rep.spinChannels.map((c) => ({
      spin: c.spin,
      metal: c.metal,
      semimetal: c.semimetal,
      fermi_eV: c.fermi_eV === null ? null : e6(c.fermi_eV),
      classificationReason: c.classificationReason,
      crossingBands: c.crossingBands,
    }));
  }
  if (rep.rejected) o.rejected = rep.rejected.map(rejectedJson);
  if (rep.interpolation) o.interpolation = { ...rep.interpolation };
  o.warnings = rep.warnings;
  o.cautions = rep.cautions;
  return o;
}
