/**
 * `compare` follows valleys and peaks only: a crossing that looks like a valley by band index is never a
 * column, whether the report came from analysis (where it is set aside) or lists it among its extrema too.
 */
import assert from 'node:assert/strict';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import { compareRuns } from '../../../src/core/compare/compareRuns';
import type { Report } from '../../../src/core/model';
import { cubicLattice, parabolicBand, pathModel, type Dispersion, type PathLeg } from '../../support/models';

const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
const M: PathLeg = { label: 'M', k: [0.5, 0.5, 0] };
const A = 4;

/** Two straight bands E = 3.5 ± v|kx − k0| crossing at a quarter of Γ–X (analytic), with an optional avoided gap. */
function run(gap: number): Report {
  const k0 = (2 * Math.PI * 0.25) / A;
  const lines: Dispersion[] = [1, -1].map((s) => (kc) => 3.5 + s * Math.sqrt((1.0 * (kc[0] - k0)) ** 2 + (gap / 2) ** 2));
  const bs = pathModel({
    lattice: cubicLattice(A),
    bands: [parabolicBand(-1, -0.5), parabolicBand(2, 5), ...lines],
    electrons: 2,
    legs: [[G, X, M]],
    pointsPerSegment: 41,
  });
  return analyzeBandStructure(bs, { range_eV: 2 });
}

const atCrossing = (k: readonly number[]): boolean => Math.abs(k[0]! - 0.25) < 1e-9 && k[1] === 0 && k[2] === 0;

describe('compare never tracks a rejected candidate', () => {
  it('two runs of a crossing (no gap, then a 2 meV avoided gap): no valley column at the crossing', () => {
    const runs = [run(0), run(0.002)].map((report, i) => ({ name: `run${i}`, report, lattice: cubicLattice(A) }));
    assert.ok(runs.every((r) => (r.report.rejected ?? []).some((x) => x.reason === 'crossing' && atCrossing(x.k))));
    const c = compareRuns(runs);
    assert.ok(c.columns.length >= 2); // the edges are still compared
    assert.ok(!c.columns.some((col) => atCrossing(col.k)), JSON.stringify(c.columns));
  });

  it('a report that also lists the crossing among its extrema (as an older annotations file would) still gets no column for it', () => {
    const report = run(0);
    const x = report.rejected!.find((r) => r.reason === 'crossing')!;
    const cbm = report.extrema.find((e) => e.kind === 'cbm')!;
    const phantom = { ...cbm, kind: 'valley' as const, band: x.band, k: x.k, eV: x.eV, label: null };
    const withPhantom: Report = { ...report, extrema: [...report.extrema, phantom] };
    const c = compareRuns([{ name: 'a', report: withPhantom, lattice: cubicLattice(A) }]);
    assert.ok(!c.columns.some((col) => atCrossing(col.k)), JSON.stringify(c.columns));
    // Control: without the rejected list the same phantom would be a column.
    const c2 = compareRuns([{ name: 'a', report: { ...withPhantom, rejected: [] }, lattice: cubicLattice(A) }]);
    assert.ok(c2.columns.some((col) => atCrossing(col.k)));
  });
});
