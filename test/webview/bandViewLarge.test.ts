/**
 * The band view with many bands and many k-points (min/max column decimation), and with two spin channels.
 */
import assert from 'node:assert/strict';
import { startHarness, type Harness, type ViewPage } from './support/bandViewHarness';
import { bandDataFromStructure, bandDataMessage, loadRunForView } from './support/coreBandData';
import { COLUMN_EXTENTS, installPageHelpers, waitForExpression } from './support/pageHelpers';
import { FOLDED_CHAIN_SOURCE } from './support/foldedChain.mjs';
import type { BandStructure } from '../../src/core/model';

type Probe = { inside: boolean; hit: boolean };

async function open(h: Harness): Promise<ViewPage> {
  const v = await h.open('dark');
  await installPageHelpers(v.page);
  await v.page.evaluate(COLUMN_EXTENTS);
  return v;
}

describe('band view: large runs and spin channels (headless Chromium)', function () {
  this.timeout(120_000);
  let h: Harness;
  before(async () => {
    h = await startHarness();
  });
  after(async () => {
    if (h) await h.close();
  });

  it('500 bands × 4 000 k-points: min/max columns draw what full detail draws; zoom returns full detail', async () => {
    const v = await open(h);
    await v.page.evaluate(`window.__hostPost((${FOLDED_CHAIN_SOURCE})(500, 4000))`);
    await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null', 30_000);
    assert.equal(await v.page.evaluate('window.valleyscopeBandView.lastDraw.mode'), 'envelope');
    // A metal (no gap, no VBM): the energy zero is the Fermi level the data gives.
    assert.equal(await v.page.locator('.vs-y-title').textContent(), 'E − EF (eV)');
    await v.page.screenshot({ path: 'test-artifacts/bandview-500-bands.png' });
    const env = (await v.page.evaluate('__t.extents()')) as { top: number[]; bottom: number[] };
    await v.page.evaluate(`window.valleyscopeBandView.render('lines')`);
    const full = (await v.page.evaluate('__t.extents()')) as { top: number[]; bottom: number[] };
    // Same columns covered, and per column the same top and bottom rows within 2 px (line joins differ).
    let compared = 0;
    for (let x = 2; x < env.top.length - 2; x++) {
      assert.equal(env.top[x]! < 0, full.top[x]! < 0, `column ${x} coverage`);
      if (full.top[x]! < 0) continue;
      assert.ok(
        Math.abs(env.top[x]! - full.top[x]!) <= 2 && Math.abs(env.bottom[x]! - full.bottom[x]!) <= 2,
        `column ${x}: ${env.top[x]}–${env.bottom[x]} vs ${full.top[x]}–${full.bottom[x]}`,
      );
      compared++;
    }
    assert.ok(compared > 500, `compared ${compared} columns`);
    // The model's bands span [−2t, 2t] = [−2, 2] eV (half filling: Fermi level at 0): nothing drawn outside.
    await v.page.evaluate(`window.valleyscopeBandView.render()`);
    const edge = (await v.page.evaluate(`(function () {
      var a = window.valleyscopeBandView, off = __t.canvasOffset();
      return { top: a.screenOf(0, 0, 499).y - off.y, bottom: a.screenOf(0, 0, 0).y - off.y, h: off.h };
    })()`)) as { top: number; bottom: number; h: number };
    const cols = env.top.filter((t) => t >= 0);
    assert.ok(Math.min(...cols) >= Math.floor(edge.top) - 2, 'nothing above the top band');
    assert.ok(Math.max(...env.bottom) <= Math.ceil(edge.bottom) + 2, 'nothing below the bottom band');
    // Zoom far in: few points per column, drawn as lines, every sampled band point on the canvas.
    await v.page.evaluate(`window.valleyscopeBandView.setZoom(400, -400 * 300 + 300, -400 * 300 + 300)`);
    await v.page.evaluate(`window.valleyscopeBandView.render()`);
    assert.equal(await v.page.evaluate('window.valleyscopeBandView.lastDraw.mode'), 'lines');
    const inside = (await v.page.evaluate(`__t.probeVisible(0, 2, 20000)`)) as Probe[];
    assert.ok(inside.length > 3, `points in the zoomed view (${inside.length})`);
    assert.equal(inside.filter((r) => !r.hit).length, 0);
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });

  it('spin channels: the toggle shows channel 1, channel 2, or both', async () => {
    // Two channels from the Stoner picture of a ferromagnet (E. C. Stoner, Proc. R. Soc. A 165, 372 (1938)):
    // the same bands, the minority channel rigidly shifted by an exchange splitting Δ = 0.6 eV.
    const si = await loadRunForView('fixtures/epm/si', 'Si');
    const delta = 0.6;
    const bs: BandStructure = {
      ...si.bs,
      nSpin: 2,
      energies: [si.bs.energies[0]!, si.bs.energies[0]!.map((e) => e + delta)],
      occupations: si.bs.occupations ? [si.bs.occupations[0]!, si.bs.occupations[0]!] : null,
    };
    const run = bandDataFromStructure(bs, 'Si, rigid exchange splitting');
    const v = await open(h);
    await v.hostPost(bandDataMessage(run.data));
    await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
    await v.page.waitForTimeout(200); // the toolbar gains the spin control: let the layout settle and redraw
    assert.equal(await v.page.locator('label:has(vscode-single-select.vs-spin)').isVisible(), true, 'spin control shown for two channels');
    const pts: [number, number, number][] = [];
    for (let k = 5; k < run.data.nk; k += 23) for (let b = 0; b < 8; b++) pts.push([0, k, b]);
    const pts2 = pts.map(([, k, b]) => [1, k, b] as [number, number, number]);
    const probeBoth = async (): Promise<[number, number]> => {
      const a = ((await v.page.evaluate(`__t.probe(${JSON.stringify(pts)}, 2)`)) as Probe[]).filter((r) => r.inside);
      const b = ((await v.page.evaluate(`__t.probe(${JSON.stringify(pts2)}, 2)`)) as Probe[]).filter((r) => r.inside);
      return [a.filter((r) => r.hit).length / a.length, b.filter((r) => r.hit).length / b.length];
    };
    const choose = async (value: string): Promise<void> => {
      await v.page.evaluate(
        `(function () { var s = document.querySelector('vscode-single-select.vs-spin'); s.value = '${value}'; s.dispatchEvent(new Event('change')); })()`,
      );
    };
    // Both channels shown by default (channel 2 dashed: probes look 2 px around each point, wider than a dash gap).
    let [up, down] = await probeBoth();
    assert.equal(up, 1);
    assert.equal(down, 1);
    await choose('up');
    [up, down] = await probeBoth();
    assert.equal(up, 1, 'channel 1 drawn');
    assert.ok(down < 0.5, `channel 2 mostly absent where it does not overlap channel 1 (${down})`);
    await choose('down');
    [up, down] = await probeBoth();
    assert.equal(down, 1, 'channel 2 drawn');
    assert.ok(up < 0.5, `channel 1 mostly absent (${up})`);
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });
});
