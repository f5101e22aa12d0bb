/**
 * Masses that can be quoted: `determined` is false when a fit has no more points than unknowns, when its
 * standard error exceeds 30 % of |m|, or when its vertex lies outside the points it used; the readable
 * summary then writes "undetermined", and averaged masses leave such masses out.
 */
import assert from 'node:assert/strict';
import { fitCurvature } from '../../../src/core/analysis/fits/index';
import { summaryText } from '../../../src/core/report/summaryText';
import { reportToJson } from '../../../src/core/report/reportJson';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { HBAR2_OVER_ME_EV_A2 } from '../../../src/core/units';
import { cosineBand, cubicLattice, parabolicBand, pathModel, type PathLeg } from '../../support/models';

/** Samples of E(t) at t = 0, h, 2h, ... */
function line(f: (t: number) => number, h: number, n: number): { t: Float64Array; e: Float64Array } {
  const t = Float64Array.from({ length: n }, (_, i) => i * h);
  return { t, e: t.map(f) };
}

/** Free electron along a line: E = ħ²t²/2m with m = 1 (analytic). */
const free = (t: number): number => (HBAR2_OVER_ME_EV_A2 / 2) * t * t;

describe('quotable masses (determined)', () => {
  it('a free-vertex parabola through exactly 3 points (3 unknowns) is undetermined, though its value is exact', () => {
    const out = fitCurvature('parabola', line(free, 0.05, 3), { window_meV: 1000, energySigma: 0 });
    assert.ok(out.fit);
    assert.ok(Math.abs(out.fit.mass - 1) < 1e-9); // analytic m* = 1: the value is right, it is just untested
    assert.equal(out.fit.points, 3);
    assert.equal(out.fit.determined, false);
    assert.match(out.fit.undeterminedReason ?? '', /3 points for 3 unknowns/);
  });

  it('the same 3 points at a time-reversal-invariant k (2 unknowns: E0 and the curvature) are determined', () => {
    const out = fitCurvature('parabola', { ...line(free, 0.05, 3), even: true }, { window_meV: 1000, energySigma: 0 });
    assert.equal(out.fit?.determined, true);
    assert.ok(Math.abs(out.fit.mass - 1) < 1e-9); // analytic m* = 1
  });

  it('a standard error above 30 % of |m| makes the mass undetermined', () => {
    // A heavy band (m = 50) over 5 points 0.01 Å⁻¹ apart moves 0.12 meV; an energy error of 0.1 meV swamps it.
    const heavy = (t: number): number => (HBAR2_OVER_ME_EV_A2 / (2 * 50)) * t * t;
    const noisy = fitCurvature('parabola', line(heavy, 0.01, 5), { window_meV: 1000, energySigma: 1e-4 });
    assert.equal(noisy.fit?.determined, false);
    assert.match(noisy.fit.undeterminedReason ?? '', /standard error/);
    // Control: the same points with full precision are determined.
    const clean = fitCurvature('parabola', line(heavy, 0.01, 5), { window_meV: 1000, energySigma: 0 });
    assert.equal(clean.fit?.determined, true);
  });

  it('a vertex outside the points used makes the mass undetermined', () => {
    // A steep line with a slight curvature: the parabola's vertex lies far beyond the sampled side.
    const sloped = (t: number): number => 2 * t + 0.5 * t * t;
    const out = fitCurvature('parabola', line(sloped, 0.02, 8), { window_meV: 1000, energySigma: 0 });
    assert.equal(out.fit?.determined, false);
    assert.match(out.fit.undeterminedReason ?? '', /vertex/);
  });

  it('central-2 is checked against the same stencil at 2h: a cosine band sampled coarsely is undetermined', () => {
    // E = −2t cos(ka): the second difference at step h gives the curvature times 2(1 − cos ah)/(ah)²
    // (analytic); at ah = π/2 that is 0.81, at 2h 0.41: they differ by half.
    const a = 3;
    const t = 0.5;
    const band = (q: number): number => -2 * t * Math.cos(q * a);
    const coarse = fitCurvature('central-2', { ...line(band, Math.PI / 2 / a, 3), even: true }, { window_meV: 25, energySigma: 0 });
    assert.equal(coarse.fit?.method, 'central-2');
    assert.equal(coarse.fit?.determined, false);
    assert.match(coarse.fit.undeterminedReason ?? '', /between steps h and 2h/);
    // Fine steps (ah = 0.05): both agree within 0.1 %, and the mass is ħ²/(2ta²) within 0.1 % (analytic).
    const fine = fitCurvature('central-2', { ...line(band, 0.05 / a, 3), even: true }, { window_meV: 25, energySigma: 0 });
    assert.equal(fine.fit?.determined, true);
    assert.ok(Math.abs(fine.fit.mass / (HBAR2_OVER_ME_EV_A2 / (2 * t * a * a)) - 1) < 1e-3);
  });

  it('old method names are accepted: fd3 is central-2, fd5 is central-4', () => {
    const s = { ...line(free, 0.01, 9), even: true };
    assert.equal(fitCurvature('fd3', s, { window_meV: 25, energySigma: 0 }).fit?.method, 'central-2');
    assert.equal(fitCurvature('fd5', s, { window_meV: 25, energySigma: 0 }).fit?.method, 'central-4');
  });

  it('the symmetric difference at a time-reversal-invariant path end equals the centred one (E even about Γ)', () => {
    const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
    const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
    const bs = pathModel({
      lattice: cubicLattice(4),
      bands: [parabolicBand(-1, -0.5), parabolicBand(1, 0.3)],
      electrons: 2,
      legs: [[G, X]],
      pointsPerSegment: 41,
    });
    const cbm = analyzeBandStructure(bs, { method: 'central-4' }).extrema.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.masses.length, 1);
    assert.equal(cbm.masses[0]!.method, 'central-4'); // not the one-sided 'forward-3'
    assert.ok(Math.abs(cbm.masses[0]!.mass - 0.3) < 1e-9); // analytic m* = 0.3
  });
});

describe('undetermined masses in the outputs', () => {
  // A cosine band (analytic tight binding) on a path with only 3 points per segment: central-2 at Γ compares
  // steps h and 2h at ka = π/2 and π and finds them 50 % apart.
  const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
  const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
  const M: PathLeg = { label: 'M', k: [0.5, 0.5, 0] };
  const bs = pathModel({
    lattice: cubicLattice(3.5),
    bands: [cosineBand(-1, [-0.2, -0.2, -0.2]), cosineBand(1, [0.4, 0.4, 0.4])],
    electrons: 2,
    legs: [[G, X, M, G]],
    pointsPerSegment: 3,
  });
  const report = analyzeBandStructure(bs, { method: 'central-2' });
  const cbm = report.extrema.find((e) => e.kind === 'cbm')!;

  it('every mass at the CBM is undetermined, and no averaged mass is built from them', () => {
    assert.ok(cbm.masses.length > 0);
    assert.ok(
      cbm.masses.every((m) => m.determined === false),
      JSON.stringify(cbm.masses),
    );
    assert.equal(cbm.tensor, null);
    assert.equal(cbm.dosMass, null);
    assert.ok(cbm.warnings.some((w) => /undetermined/.test(w)));
  });

  it('the text output writes "undetermined" instead of a bare number, with the fit warnings under it', () => {
    const text = summaryText(report);
    const block = text.slice(text.indexOf('CBM: band 2'));
    const lines = block.split('\n').filter((l) => /towards /.test(l));
    assert.ok(lines.length > 0);
    for (const l of lines) {
      assert.match(l, /m\* undetermined/);
      assert.doesNotMatch(l, /m\* = /);
    }
    // Each fit's own warnings follow it, indented under it (here: the mirrored difference at Γ).
    const all = block.split('\n');
    const first = all.findIndex((l) => /towards /.test(l));
    assert.match(all[first + 1] ?? '', /^ {8}! Symmetric difference/);
  });

  it('the JSON output carries determined and the reason', () => {
    const j = reportToJson(report) as { extrema: { kind: string; masses: { determined: boolean; undeterminedReason?: string }[] }[] };
    const c = j.extrema.find((e) => e.kind === 'cbm')!;
    assert.ok(c.masses.every((m) => m.determined === false && typeof m.undeterminedReason === 'string'));
  });

  it('the annotations file records determined (false here) with the reason among the mass warnings, and reads it back', () => {
    const source = { format: 'model', file: 'run/EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: '0'.repeat(64) }] };
    const doc = buildAnnotations(report, source, { ...DEFAULT_SETTINGS, method: 'central-2' }, { toolVersion: '0.1.0' });
    const entry = doc.entries.find((e) => e.kind === 'cbm')!;
    assert.ok(entry.masses.every((m) => m.determined === false && m.warnings.some((w) => /^Undetermined: /.test(w))));
    const text = serializeAnnotations(doc);
    assert.match(text, /"determined": false/);
    const back = parseAnnotations(text, 'run/EIGENVAL.valleys.json');
    assert.ok(back.entries.find((e) => e.kind === 'cbm')!.masses.every((m) => m.determined === false));
    // A file written before the field existed reads as "not recorded" (null), not as false.
    const old = parseAnnotations(text.replace(/\s*"determined": false,/g, ''), 'run/EIGENVAL.valleys.json');
    assert.ok(old.entries.find((e) => e.kind === 'cbm')!.masses.every((m) => m.determined === null));
  });
});
