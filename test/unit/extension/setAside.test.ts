/**
 * The band view never offers a set-aside candidate as an extremum to fit. Data: the demo silicon run
 * (Cohen & Bergstresser empirical pseudopotential bands): at X the two lowest conduction bands of the
 * diamond structure meet and cross (one falls towards the Δ minimum, the other rises; common practice), so by
 * band index the upper one has a "V" minimum there that is not a valley.
 */
import assert from 'node:assert/strict';
import { buildBandData } from '../../../src/extension/bandData';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { decodeArray } from '../../../src/protocol';
import { findLocalExtrema } from '../../../webview/bandView/localExtrema';
import { setAsideAt } from '../../../webview/bandView/setAside';
import { loadSi } from './demoRun';

describe('set-aside candidates in the band view data', () => {
  it("the crossing at X is listed as set aside, and the drawn arrays' local minimum there is not offered", async () => {
    const { bs, report, geometry } = await loadSi();
    const d = buildBandData(bs, report, geometry, 'EIGENVAL', DEFAULT_SETTINGS, 'vbm');
    const crossing = (d.setAside ?? []).find((m) => m.reason === 'crossing');
    assert.ok(crossing, JSON.stringify(d.setAside));
    const kf = [0, 1, 2].map((c) => bs.kpoints[3 * crossing.kIndex + c]!);
    assert.deepEqual(kf, [0.5, 0, 0.5]); // X of the fcc zone in the primitive reciprocal basis (common practice)
    // No report extremum (valley) stands there.
    assert.ok(!report.extrema.some((e) => e.kind === 'valley' && e.k.join() === kf.join()));
    // The drawn arrays have local extrema of that band at X (the "V"); each is recognised as set aside.
    const energies = d.energies.map((e) => decodeArray(e) as Float64Array);
    const pieces = d.segments.map((s) => ({ i0: s.start, i1: s.end + 1 }));
    const x = findLocalExtrema(energies, d.nBands, pieces, () => true);
    let atX = 0;
    for (let i = 0; i < x.count; i++) {
      if (x.band0[i] !== crossing.band0 || x.spin[i] !== crossing.spin) continue;
      const k = [0, 1, 2].map((c) => bs.kpoints[3 * x.kIndex[i]! + c]!);
      if (k.join() !== kf.join()) continue;
      atX++;
      // Every visit of X on the path is covered, not only the one the analysis judged.
      assert.ok(setAsideAt(d.setAside, crossing.spin, x.kIndex[i]!, crossing.band0), `k index ${x.kIndex[i]}`);
    }
    assert.ok(atX > 0, 'the arrays have a local extremum of that band at X');
    // Control: a local extremum of another band is not set aside.
    assert.equal(setAsideAt(d.setAside, 0, crossing.kIndex, 0), null);
  });
});
