/** The band view's pure modules (no browser): extrema for snapping, snapping, energy zero, export SVG. */
import assert from 'node:assert/strict';
import { findLocalExtrema, piecesFromSegments } from '../../webview/bandView/localExtrema';
import { snapToCandidate } from '../../webview/bandView/snap';
import { availableReferences, chooseReference } from '../../webview/bandView/energyReference';
import { buildExportSvg, EXPORT_UNITS_W, pngSize } from '../../webview/bandView/exportPlot';
import { buildViewModel } from '../../webview/bandView/viewModel';
import { loadRunForView } from './support/coreBandData';
import type { BandData } from '../../src/protocol';

/** The export SVG of the whole path, spin channel 1, energies from −6 to 6 eV about the VBM. */
function exportWholePath(data: BandData): ReturnType<typeof buildExportSvg> {
  const vm = buildViewModel(data);
  return buildExportSvg({
    vm,
    spins: [0],
    reference: chooseReference('vbm', { vbm_eV: data.vbm_eV, fermiEnergy: null }),
    xDomain: [vm.distance[0]!, vm.distance[vm.nk - 1]!],
    yDomain: [-6, 6],
    marks: vm.marks,
    curves: [],
  });
}

describe('band view modules', () => {
  it('local extrema of a cosine band sit at k = 0 (minimum) and k = π/a (maximum)', () => {
    // E(k) = −2t cos(ka), nearest-neighbour tight-binding chain (textbook analytic model), t = 1, a = 1,
    // sampled from −π to π in 201 points; the ends are labelled (zone boundary).
    const n = 201;
    const e = Float64Array.from({ length: n }, (_, i) => -2 * Math.cos(-Math.PI + (2 * Math.PI * i) / (n - 1)));
    const x = findLocalExtrema([e], 1, [{ i0: 0, i1: n }], (k) => k === 0 || k === n - 1);
    const found = Array.from({ length: x.count }, (_, i) => [x.kIndex[i], x.sign[i]]);
    assert.deepEqual(found, [
      [0, 1],
      [100, -1],
      [200, 1],
    ]);
  });

  it('a flat run counts once, at its middle (the core rule, pathLocalExtrema.ts); unlabelled ends do not count', () => {
    // The band view used to place a plateau at its first point; it now uses the analysis's rule (middle of the run).
    const e = Float64Array.from([3, 1, 1, 1, 2, 0]);
    const x = findLocalExtrema([e], 1, [{ i0: 0, i1: 6 }], () => false);
    assert.deepEqual(Array.from(x.kIndex), [2, 4]);
    assert.deepEqual(Array.from(x.sign), [-1, 1]);
  });

  it('path pieces break only at jumps', () => {
    const pieces = piecesFromSegments(
      [
        { start: 0, end: 10, afterJump: false },
        { start: 10, end: 20, afterJump: false },
        { start: 21, end: 30, afterJump: true },
      ],
      31,
    );
    assert.deepEqual(pieces, [
      { i0: 0, i1: 21 },
      { i0: 21, i1: 31 },
    ]);
  });

  it('snapping takes the nearest candidate within the tolerance in both axes', () => {
    const c = [
      { px: 100, py: 100, id: 0 },
      { px: 104, py: 101, id: 1 },
      { px: 103, py: 130, id: 2 },
    ];
    assert.equal(snapToCandidate(103, 101, c, 8)?.id, 1);
    assert.equal(snapToCandidate(103, 118, c, 8), null, 'too far in y from every candidate');
    assert.equal(snapToCandidate(120, 100, c, 8), null, 'too far in x');
  });

  it('energy zero: VBM, Fermi level or raw, with a note when the wanted one is missing', () => {
    assert.deepEqual(availableReferences({ vbm_eV: 1, fermiEnergy: 2 }), ['vbm', 'fermi', 'raw']);
    const metal = chooseReference('vbm', { vbm_eV: null, fermiEnergy: 5.5 });
    assert.equal(metal.reference, 'fermi');
    assert.equal(metal.offset, 5.5);
    assert.equal(metal.axisTitle, 'E − E_F (eV)');
    assert.match(metal.fallbackNote ?? '', /No valence-band maximum/);
    assert.equal(chooseReference('fermi', { vbm_eV: 1, fermiEnergy: null }).reference, 'vbm');
    assert.equal(chooseReference('raw', { vbm_eV: 1, fermiEnergy: 2 }).offset, 0);
  });

  it('export SVG: one journal column wide, axis titles with units, every band inside the frame', async () => {
    const run = await loadRunForView('fixtures/epm/si', 'Si (EPM)');
    const { svg, width, height } = exportWholePath(run.data);
    // 85 mm at 72 pt per inch (25.4 mm per inch, the definition of the inch).
    assert.equal(width, EXPORT_UNITS_W);
    assert.equal(EXPORT_UNITS_W, Math.round((85 / 25.4) * 72));
    assert.ok(height > 0);
    assert.match(svg, /^<svg xmlns="http:\/\/www.w3.org\/2000\/svg" width="85mm" height="64mm"/);
    assert.ok(svg.includes('>k (Å⁻¹)</text>'));
    assert.ok(svg.includes('E − E<tspan baseline-shift="sub" font-size="6">VBM</tspan> (eV)'));
    // Two colours of bands (filled and empty), each one path, 4 + 8 bands as sub-paths (fixture: 4 valence bands).
    const bandPaths = [...svg.matchAll(/<path d="([^"]*)" stroke="(#1d4f91|#c0562b)"/g)];
    assert.equal(bandPaths.length, 2);
    const subpaths = bandPaths.map((m) => (m[1]!.match(/M/g) ?? []).length);
    // One sub-path per band per connected piece (the fixture's path has one jump, K|U: two pieces).
    assert.deepEqual(subpaths, [4 * 2, 8 * 2]);
    assert.equal(pngSize().width, Math.round((85 / 25.4) * 600));
  });

  it('export SVG: labels and titles from a hostile file are escaped, never markup', async () => {
    const run = await loadRunForView('fixtures/epm/si', 'Si <b>"x"</b> & co');
    const evil = '<image href="http://example.invalid/x.png" onerror="alert(1)"/>';
    const data = { ...run.data, ticks: run.data.ticks.map((t, i) => (i === 1 ? { ...t, label: evil } : t)) };
    const { svg } = exportWholePath(data);
    assert.ok(!svg.includes('<image'), 'no element injected');
    assert.ok(svg.includes('&lt;image href=&quot;http://example.invalid/x.png&quot; onerror=&quot;alert(1)&quot;/&gt;'));
    assert.ok(svg.includes('<title>Si &lt;b&gt;&quot;x&quot;&lt;/b&gt; &amp; co: band structure</title>'));
  });
});

describe('k-axis labels on a narrow plot (tickLabels.ts)', () => {
  it('keeps every label when they are far apart, drops those that would print over their neighbour', async () => {
    const { fittingLabels } = await import('../../webview/bandView/tickLabels');
    // 7 px per character (the function's own estimate): 'Γ' is 7 px wide, 'K|U' 21 px.
    assert.deepEqual(fittingLabels([0, 100, 200], ['Γ', 'X', 'L']), [0, 1, 2]);
    // X and W 6 px apart cannot both be written; the path's end (L) is kept.
    assert.deepEqual(fittingLabels([0, 100, 106, 200], ['Γ', 'X', 'W', 'L']), [0, 1, 3]);
    // The last label wins over the one just before it.
    assert.deepEqual(fittingLabels([0, 100, 104], ['Γ', 'X', 'L']), [0, 2]);
    // Kept labels never overlap (property over random positions).
    for (let trial = 0; trial < 200; trial++) {
      const xs = Array.from({ length: 2 + (trial % 9) }, () => Math.random() * 300).sort((a, b) => a - b);
      const labels = xs.map((_, i) => ['Γ', 'X', 'K|U', 'W', 'L'][i % 5]!);
      const kept = fittingLabels(xs, labels);
      for (let j = 1; j < kept.length; j++) {
        const a = kept[j - 1]!;
        const b = kept[j]!;
        assert.ok(xs[b]! - labels[b]!.length * 3.5 >= xs[a]! + labels[a]!.length * 3.5 + 4 - 1e-9, `labels ${a} and ${b} overlap`);
      }
    }
  });
});
