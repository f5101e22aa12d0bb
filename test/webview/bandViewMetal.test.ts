/**
 * The band view shows a metal as a metal: the Fermi level drawn and named, no gap band, the crossing band
 * named; and a spinor run says so. Fed by the core from model band structures (free-electron metal,
 * Ashcroft & Mermin ch. 2, Gaussian occupations; the round-trip cosine model as a spin-orbit run).
 */
import assert from 'node:assert/strict';
import { startHarness, type Harness } from './support/bandViewHarness';
import { bandDataFromStructure, bandDataMessage } from './support/coreBandData';
import { installPageHelpers, waitForExpression } from './support/pageHelpers';
import { smearedFreeElectronMetal } from '../support/metalModels';
import { spinOrbitModel } from '../support/writers/roundTripModel';

describe('band view: metals and spinors', function () {
  this.timeout(90_000);
  let h: Harness;
  before(async () => {
    h = await startHarness();
  });
  after(async () => {
    await h.close();
  });

  it('a free-electron metal: Fermi level line, no gap band, "metal (no gap)" with E_F and the crossing band', async () => {
    const run = bandDataFromStructure(smearedFreeElectronMetal('gaussian', 0.1), 'free-electron metal');
    assert.equal(run.report.metal, true);
    const v = await h.open('dark');
    await installPageHelpers(v.page);
    await v.hostPost(bandDataMessage(run.data));
    await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
    const text = (await v.page.locator('.vs-gap').textContent()) ?? '';
    assert.match(text, /^metal \(no gap\), E_F \d+\.\d{3} eV, band 1 crossing/);
    assert.equal(await v.page.locator('svg line.vs-fermi').count(), 1);
    assert.equal(await v.page.locator('svg text.vs-fermi-label').textContent(), 'E_F');
    assert.equal(await v.page.locator('svg rect.vs-gap-band').count(), 0);
    assert.deepEqual(v.errors, []);
    assert.deepEqual(await v.cspViolations(), []);
    await v.page.close();
  });

  it('a spinor run names its spinor state; a semiconductor keeps its gap band and has no Fermi line', async () => {
    const run = bandDataFromStructure(spinOrbitModel(), 'spin-orbit model');
    const v = await h.open('light');
    await installPageHelpers(v.page);
    await v.hostPost(bandDataMessage(run.data));
    await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
    const text = (await v.page.locator('.vs-gap').textContent()) ?? '';
    assert.match(text, /^gap 1\.200 eV, indirect .*spinors \(one electron per band\)/); // analytic model gap 1.2 eV
    assert.equal(await v.page.locator('svg line.vs-fermi').count(), 0);
    assert.equal(await v.page.locator('svg rect.vs-gap-band').count(), 1);
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });
});
