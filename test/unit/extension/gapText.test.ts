import assert from 'node:assert/strict';
import { gapLensText, gapStatusText, gapTooltip } from '../../../src/extension/gapText';
import type { Report } from '../../../src/core/model';
import { loadSi } from './demoRun';
import { emptyReport } from './emptyReport';

const base: Report = emptyReport({ electrons: 2 });

describe('extension: gap texts for the status bar and code lens', () => {
  it('reports the demo silicon gap as indirect with its edges', async () => {
    const { report } = await loadSi();
    const g = report.gap!;
    assert.equal(gapStatusText(report, false), `Gap ${g.eV.toFixed(2)} eV indirect`);
    assert.equal(gapStatusText(report, true), `Gap ${g.eV.toFixed(2)} eV indirect (partial)`);
    assert.match(gapLensText(report, false), /^Gap \d\.\d\d eV indirect: VBM Γ \(band 4\) → CBM k 0\.423 0\.000 0\.423 \(band 5\)$/);
    const tip = gapTooltip(report, false);
    assert.ok(tip.includes(`VBM ${g.vbm.eV.toFixed(4)} eV`));
    // The usual caution about semilocal DFT gaps is passed through from the report.
    for (const c of report.cautions) assert.ok(tip.includes(c));
  });

  it("names a mesh run's edge off the mesh by its place on a line from Γ, as the analysis gives it", async () => {
    const { report } = await loadSi();
    const g = report.gap!;
    const mesh: Report = { ...report, gap: { ...g, cbm: { ...g.cbm, position: '0.85 Γ→X' } } };
    assert.match(gapLensText(mesh, false), /→ CBM 0\.85 Γ→X \(band 5\)$/);
    assert.match(gapTooltip(mesh, false), /CBM .* eV at 0\.85 Γ→X \(band 5\)/);
  });

  it('names the spin channel of each edge only in a spin-polarised run', async () => {
    const { report } = await loadSi();
    assert.doesNotMatch(gapLensText(report, false), /spin/);
    const g = report.gap!;
    const polarised: Report = { ...report, nspin: 2, gap: { ...g, cbm: { ...g.cbm, spin: 1 } } };
    assert.match(gapLensText(polarised, false), /VBM Γ \(band 4, spin up\) → CBM .*\(band 5, spin down\)$/);
    assert.match(gapTooltip(polarised, false), /VBM .* \(band 4, spin up\)/);
  });

  it('says Metal, or that edges are unknown', () => {
    assert.equal(gapStatusText({ ...base, metal: true }, false), 'Metal');
    assert.equal(gapLensText({ ...base, metal: true }, false), 'Metal: bands cross the Fermi level');
    assert.equal(gapStatusText(base, false), 'Gap unknown');
    assert.match(gapLensText(base, true), /unknown.*partial file, provisional/);
    assert.equal(gapStatusText({ ...base, metal: true, semimetal: true }, false), 'Semimetal');
    assert.equal(gapStatusText({ ...base, metal: false, gapReason: 'local' }, false), 'No gap (local run)');
    assert.match(
      gapTooltip({ ...base, metal: true, fermi_eV: 1.5, crossingBands: [2, 3], spinors: true }, false),
      /Fermi level 1\.5000 eV, crossing bands 2, 3\n[\s\S]*Spinors/,
    );
  });
});
