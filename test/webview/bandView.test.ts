/**
 * The band view bundle in real Chromium, fed by the core: silicon from the empirical pseudopotential model
 * (fixtures/epm/si, Cohen & Bergstresser, Phys. Rev. 141, 789 (1966)) read with src/core/load.ts, analysed by
 * the core, shaped by the extension's own bandData.ts; fits answered by the extension's fit service.
 */
import assert from 'node:assert/strict';
import { writeFileSync } from 'node:fs';
import { ARTIFACTS, markOf, openWithRun, siliconSession, waitPosted, type Harness, type ViewPage } from './support/bandViewHarness';
import { bandDataFromStructure, bandDataMessage, hostFitResult, loadRunForView, type LoadedRun } from './support/coreBandData';
import { installPageHelpers, hexToRgb, waitForExpression } from './support/pageHelpers';
import { THEME_VARS, type TestTheme } from './support/themes';
import { sliderAtWindow } from '../../webview/bandView/windowSlider';
import { isViewToHostMessage, HostToViewType, type FitTarget } from '../../src/protocol';

type Probe = { inside: boolean; hit: boolean; colour: [number, number, number, number] | null; x: number; y: number };
type Posted = Record<string, unknown>;

async function screenOf(v: ViewPage, t: FitTarget): Promise<{ x: number; y: number }> {
  return v.page.evaluate(`window.valleyscopeBandView.screenOf(${t.spin}, ${t.kIndex}, ${t.band0})`);
}

async function clickPlot(v: ViewPage, x: number, y: number): Promise<void> {
  const p = (await v.page.evaluate(`__t.pagePoint(${x}, ${y})`)) as { x: number; y: number };
  await v.page.mouse.click(p.x, p.y);
}

async function assertClean(v: ViewPage): Promise<void> {
  assert.deepEqual(await v.cspViolations(), [], 'no content-security-policy violation');
  assert.deepEqual(v.errors, [], 'no error in the page');
}

/** Click near the CBM, answer the fit request as the extension does; returns the request. */
async function fitAtCbm(v: ViewPage, run: LoadedRun): Promise<Posted> {
  const cbm = markOf(run, 'cbm');
  const before = (await v.posted()).filter((m) => m.type === 'requestFit').length;
  // On a loaded machine the first layout can still settle after the first draw (the plot resized, the marker
  // moved): if the click found nothing, look up the marker's place again and click once more.
  let req: Posted | undefined;
  for (let attempt = 0; attempt < 2 && !req; attempt++) {
    const p = await screenOf(v, cbm);
    await clickPlot(v, p.x + 3, p.y - 3);
    req = await waitPosted(v, 'requestFit', before + 1).catch((e: unknown) => {
      if (attempt === 1) throw e;
      return undefined;
    });
  }
  if (!req) throw new Error('no fit request after two clicks at the CBM');
  const t = { spin: req.spin as 0 | 1, kIndex: req.kIndex as number, band0: req.band0 as number };
  await v.hostPost(hostFitResult(run, req.requestId as number, t, req.window_meV as number, req.method as string, req.withScan === true));
  await v.page.waitForSelector('.vs-fit-body:not([hidden])');
  return req;
}

describe('band view in headless Chromium (silicon, empirical pseudopotential model)', function () {
  this.timeout(90_000);
  const session = siliconSession();
  let h: Harness;
  let run: LoadedRun;
  before(() => {
    ({ h, run } = session);
  });

  it('draws every band on the canvas where the data puts it, in the theme colours', async () => {
    const v = await openWithRun(h, run, 'dark');
    await v.page.screenshot({ path: `${ARTIFACTS}/bandview-dark-whole-path.png` });
    const pts: [number, number, number][] = [];
    for (let k = 0; k < run.data.nk; k += 7) for (let b = 0; b < run.data.nBands; b++) pts.push([0, k, b]);
    const res = (await v.page.evaluate(`__t.probe(${JSON.stringify(pts)}, 2)`)) as Probe[];
    const inside = res.filter((r) => r.inside);
    assert.ok(inside.length > 200, `enough band points inside the default view (${inside.length})`);
    const missed = inside.filter((r) => !r.hit);
    assert.equal(missed.length, 0, `every band point inside the plot is drawn (missed ${missed.length} of ${inside.length})`);
    // Filled bands in --vscode-charts-blue, empty ones in --vscode-charts-orange (the view's colour rule).
    const blue = hexToRgb(THEME_VARS.dark['--vscode-charts-blue']!);
    const orange = hexToRgb(THEME_VARS.dark['--vscode-charts-orange']!);
    assert.ok(
      ((await v.page.evaluate(`__t.countColour(${JSON.stringify(blue)}, 24)`)) as number) > 100,
      'valence bands drawn in the theme blue',
    );
    assert.ok(
      ((await v.page.evaluate(`__t.countColour(${JSON.stringify(orange)}, 24)`)) as number) > 100,
      'conduction bands drawn in the theme orange',
    );
    // Inside the gap, away from any band, the canvas is empty: at the CBM's k, halfway between VBM band and CBM.
    const cbm = markOf(run, 'cbm');
    const top = await screenOf(v, cbm);
    const below = await screenOf(v, { spin: 0, kIndex: cbm.kIndex, band0: cbm.band0 - 1 });
    assert.ok(below.y - top.y > 20, 'the gap at the CBM is more than 20 px tall in the default view');
    const off = (await v.page.evaluate('__t.canvasOffset()')) as { x: number; y: number };
    const n = (await v.page.evaluate(`__t.opaqueAround(${top.x - off.x}, ${(top.y + below.y) / 2 - off.y}, 4)`)) as number;
    assert.equal(n, 0, 'nothing drawn inside the gap');
    await assertClean(v);
    await v.page.close();
  });

  it('in a narrow view (beside a file on a laptop) the side panel goes below the plot and nothing overlaps', async () => {
    // 560 × 760 CSS px: about what a band view gets beside a file at 1280 × 800 (measured in a real editor).
    const v = await openWithRun(h, run, 'dark', { width: 560, height: 760 });
    await fitAtCbm(v, run);
    await v.page.screenshot({ path: `${ARTIFACTS}/bandview-narrow.png` });
    const boxes = (await v.page.evaluate(`(function () {
      function box(sel) { var e = document.querySelector(sel); if (!e) return null; var r = e.getBoundingClientRect(); return { x: r.left, y: r.top, w: r.width, h: r.height }; }
      var labels = Array.prototype.map.call(document.querySelectorAll('.vs-axis-x text'), function (t) { var r = t.getBoundingClientRect(); return { x: r.left, y: r.top, w: r.width, h: r.height }; });
      return { plot: box('.vs-plot'), side: box('.vs-side'), readout: box('.vs-readout'), status: box('.vs-status'), masses: box('table.vs-masses'), labels: labels, width: document.documentElement.clientWidth };
    })()`)) as Record<string, { x: number; y: number; w: number; h: number } | null> & {
      labels: { x: number; y: number; w: number; h: number }[];
      width: number;
    };
    const overlap = (a: { x: number; y: number; w: number; h: number }, b: { x: number; y: number; w: number; h: number }): boolean =>
      a.x < b.x + b.w - 0.5 && b.x < a.x + a.w - 0.5 && a.y < b.y + b.h - 0.5 && b.y < a.y + a.h - 0.5;
    const plot = boxes.plot!;
    const side = boxes.side!;
    assert.ok(plot.w > 400, `the plot keeps the width (${plot.w.toFixed(0)} px)`);
    assert.ok(side.y >= plot.y + plot.h - 0.5, 'the side panel sits below the plot');
    assert.ok(side.x + side.w <= boxes.width + 0.5, 'the side panel is not cut off on the right');
    assert.ok(boxes.masses!.x + boxes.masses!.w <= boxes.width + 0.5, 'the mass table fits the width');
    assert.ok(!overlap(boxes.readout!, boxes.status!), 'the readout and the status line do not overlap');
    for (let i = 1; i < boxes.labels.length; i++)
      assert.ok(!overlap(boxes.labels[i - 1]!, boxes.labels[i]!), `k labels ${i - 1} and ${i} do not overlap`);
    await assertClean(v);
    await v.page.close();
  });

  it('on a high-density display (2 device pixels per CSS pixel) the canvas is sharp and the bands still sit on their data', async () => {
    const v = await h.open('dark', { width: 1280, height: 760 }, 2);
    await installPageHelpers(v.page);
    await v.hostPost(bandDataMessage(run.data));
    await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
    const off = (await v.page.evaluate('__t.canvasOffset()')) as { scale: number };
    assert.equal(off.scale, 2, 'backing store at the device pixel ratio');
    const pts: [number, number, number][] = [];
    for (let k = 0; k < run.data.nk; k += 11) for (let b = 0; b < run.data.nBands; b++) pts.push([0, k, b]);
    const inside = ((await v.page.evaluate(`__t.probe(${JSON.stringify(pts)}, 3)`)) as Probe[]).filter((r) => r.inside);
    assert.ok(inside.length > 100);
    assert.equal(inside.filter((r) => !r.hit).length, 0);
    await assertClean(v);
    await v.page.close();
  });

  it('labels the path with high-symmetry points, breaks, and axis titles in proper units', async () => {
    const v = await openWithRun(h, run);
    const labels = (await v.page.evaluate(`__t.text('.vs-axis-x text')`)) as string[];
    // Standard fcc path of the fixture (Setyawan & Curtarolo 2010, as written in fixtures/epm/si/KPOINTS).
    assert.deepEqual(labels, ['Γ', 'X', 'W', 'K', 'Γ', 'L', 'U', 'W', 'L', 'K|U', 'X']);
    assert.equal(await v.page.locator('line.vs-break').count(), 2, 'the K|U jump is drawn as a break (two lines)');
    assert.equal(await v.page.locator('.vs-x-title').textContent(), 'k (Å⁻¹)');
    assert.equal(await v.page.locator('.vs-y-title').textContent(), 'E − EVBM (eV)');
    assert.equal(await v.page.locator('.vs-y-title tspan[baseline-shift="sub"]').textContent(), 'VBM');
    // Gap text beside the caution that fits the run: this fixture is model data (its SYSTEM line says so), so the
    // model caution, not the semilocal-DFT one (which is for semilocal or unknown functionals).
    const gapText = await v.page.locator('.vs-gap').textContent();
    assert.match(gapText ?? '', new RegExp(`gap ${run.report.gap!.eV.toFixed(3)} eV, indirect`));
    const cautionLine = (await v.page.locator('.vs-caution-line').textContent()) ?? '';
    assert.match(cautionLine, /come from a model/);
    assert.doesNotMatch(cautionLine, /underestimates band gaps/);
    await assertClean(v);
    await v.page.close();
  });

  it('text from a hostile file (title, labels) is shown as text, never as markup', async () => {
    const evil = '<img src="http://example.invalid/x.png" onerror="window.__pwned=1">';
    // On the path's last tick: a label that long is drawn only where it is never crowded out (see tickLabels.ts).
    const last = run.data.ticks.length - 1;
    const data = { ...run.data, title: `Si ${evil}`, ticks: run.data.ticks.map((t, i) => (i === last ? { ...t, label: evil } : t)) };
    const v = await openWithRun(h, { ...run, data });
    assert.equal(await v.page.locator('img').count(), 0);
    assert.equal(await v.page.locator('.vs-title').textContent(), `Si ${evil}`);
    assert.ok(((await v.page.evaluate(`__t.text('.vs-axis-x text')`)) as string[]).includes(evil));
    assert.equal(await v.page.evaluate('window.__pwned'), undefined);
    await assertClean(v);
    await v.page.close();
  });

  it('marks the VBM and the CBM at their data positions, and no valley at the X crossing', async () => {
    const v = await openWithRun(h, run);
    // At X the two lowest conduction bands of the diamond structure cross (common practice): the analysis sets
    // the band-index "V" there aside, so silicon has no secondary valley here and none is drawn.
    assert.ok(
      (run.data.setAside ?? []).some((m) => m.reason === 'crossing'),
      'the X crossing is set aside',
    );
    assert.equal(run.data.marks.filter((m) => m.kind === 'valley').length, 0);
    assert.equal(await v.page.locator('.vs-mark-valley').count(), 0);
    for (const kind of ['vbm', 'cbm'] as const) {
      const m = markOf(run, kind);
      const p = await screenOf(v, m);
      const tr = await v.page.locator(`.vs-mark-${kind}`).first().getAttribute('transform');
      const g = /translate\(([-\d.e]+),([-\d.e]+)\)/.exec(tr ?? '');
      assert.ok(g, `${kind} marker present`);
      assert.ok(Math.abs(Number(g[1]) - p.x) < 0.01 && Math.abs(Number(g[2]) - p.y) < 0.01, `${kind} marker sits on its band point`);
    }
    await v.page.close();
  });

  it("an undetermined mass is shown as the word, with the fit's value and the reason in its tooltip", async () => {
    const v = await openWithRun(h, run);
    const cbm = markOf(run, 'cbm');
    const p = await screenOf(v, cbm);
    const before = (await v.posted()).filter((m) => m.type === 'requestFit').length;
    await clickPlot(v, p.x + 3, p.y - 3);
    const req = await waitPosted(v, 'requestFit', before + 1);
    const t = { spin: req.spin as 0 | 1, kIndex: req.kIndex as number, band0: req.band0 as number };
    const msg = hostFitResult(run, req.requestId as number, t, req.window_meV as number, req.method as string, false);
    // The host's own fit, with its first mass marked as the core marks one it cannot quote (the rule itself is
    // tested in the unit suite); the view must not print it as a number.
    const first = { ...msg.extremum.masses[0]!, determined: false, undeterminedReason: 'standard error 45 % of |m| (above 30 %)' };
    await v.hostPost({ ...msg, extremum: { ...msg.extremum, masses: [first, ...msg.extremum.masses.slice(1)] } });
    await v.page.waitForSelector('.vs-fit-body:not([hidden])');
    const row = v.page.locator(`.vs-masses tbody tr[data-towards="${first.towards}"]`);
    const cells = await row.locator('td').allTextContents();
    assert.equal(cells[1], 'undetermined');
    assert.equal(cells[2], '—');
    assert.match((await row.getAttribute('title')) ?? '', /not quoted: standard error 45 %/);
    await assertClean(v);
    await v.page.close();
  });

  it('a click near the CBM snaps to it, posts a valid fit request, and shows the returned fit', async () => {
    const v = await openWithRun(h, run);
    const cbm = markOf(run, 'cbm');
    const req = await fitAtCbm(v, run);
    assert.ok(isViewToHostMessage(req), 'the request passes the protocol validator');
    assert.deepEqual({ spin: req.spin, kIndex: req.kIndex, band0: req.band0 }, { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0 });
    assert.equal(req.window_meV, run.data.defaults.window_meV);
    assert.equal(req.method, run.data.defaults.method);
    assert.equal(req.withScan, true);
    // Silicon's conduction minimum lies near 0.85 of Γ–X (physics.md; the EPM of Cohen & Bergstresser 1966).
    const kx = run.bs.kpoints[3 * cbm.kIndex]!;
    assert.ok(kx / 0.5 > 0.8 && kx / 0.5 < 0.9, `CBM at ${(kx / 0.5).toFixed(3)} of Γ–X`);

    const fit = hostFitResult(run, 0, cbm, 25, 'parabola', true).extremum;
    assert.match((await v.page.locator('.vs-fit-kind').textContent()) ?? '', /Conduction-band minimum/);
    for (const f of fit.masses) {
      const row = v.page.locator(`.vs-masses tbody tr[data-towards="${f.towards}"]`);
      assert.equal(await row.count(), 1, `a row for the direction towards ${f.towards}`);
      const cells = await row.locator('td').allTextContents();
      assert.equal(cells[1], f.mass.toPrecision(3), 'signed mass as the host computed it');
      assert.equal(cells[2], '—', 'no hole mass at a minimum');
      assert.equal(cells[4], String(f.points));
    }
    const dl = await v.page.locator('.vs-degeneracy').textContent();
    assert.match(dl ?? '', /Valley degeneracy Nᵥ6/, 'six Δ valleys (physics.md: star of k in the diamond structure)');
    const prov = (await v.page.locator('.vs-provenance').textContent()) ?? '';
    assert.match(prov, /parabola: Least-squares parabola/);
    const provHeads = await v.page.locator('.vs-provenance-table thead th').allTextContents();
    assert.deepEqual(provHeads.slice(0, 5), ['direction', 'method', 'window (meV)', 'points', 'stderr (mₑ)']);
    // The fitted curves are drawn over the data, one per direction, and the window scan is plotted.
    const curves = v.page.locator('path.vs-fit-curve');
    assert.equal(await curves.count(), fit.masses.length);
    for (const d of await curves.evaluateAll((ps) => ps.map((p) => p.getAttribute('d') ?? '')))
      assert.ok(d.length > 50, 'curve has a path');
    const scanPoints = await v.page.locator('.vs-scan svg circle').count();
    const expected = hostFitResult(run, 0, cbm, 25, 'parabola', true).scan!.reduce((n, s) => n + s.points.length, 0);
    assert.equal(scanPoints, expected, 'every window-scan point is plotted');
    assert.ok(expected > 0);
    // The curve starts at the extremum: its point nearest the CBM is within 2 px of the marker.
    const p = await screenOf(v, cbm);
    const near = await curves.first().evaluate(
      (el, q) => {
        const path = el as SVGPathElement;
        const L = path.getTotalLength();
        let best = Infinity;
        for (let s = 0; s <= 200; s++) {
          const pt = path.getPointAtLength((L * s) / 200);
          best = Math.min(best, Math.hypot(pt.x - q.x, pt.y - q.y));
        }
        return best;
      },
      { x: p.x, y: p.y },
    );
    assert.ok(near < 2, `fitted curve passes through the CBM (${near.toFixed(2)} px)`);
    // The cautions beside the numbers (model data: the model caution; masses depend on the method: common practice).
    assert.match((await v.page.locator('.vs-cautions').textContent()) ?? '', /come from a model/);
    assert.match((await v.page.locator('.vs-cautions').textContent()) ?? '', /Effective masses depend on/);
    await assertClean(v);
    await v.page.close();
  });

  it('a click far from any extremum posts nothing and says why', async () => {
    const v = await openWithRun(h, run);
    const cbm = markOf(run, 'cbm');
    const top = await screenOf(v, cbm);
    const below = await screenOf(v, { spin: 0, kIndex: cbm.kIndex, band0: cbm.band0 - 1 });
    await clickPlot(v, top.x, (top.y + below.y) / 2);
    assert.equal((await v.posted()).filter((m) => m.type === 'requestFit').length, 0);
    assert.match((await v.page.locator('.vs-status').textContent()) ?? '', /No band minimum or maximum within/);
    await v.page.close();
  });

  it('moving the fit window refits live and moves the window line', async () => {
    const v = await openWithRun(h, run);
    await fitAtCbm(v, run);
    // The slider is logarithmic (windowSlider.ts): its position for 60 meV gives back 60 meV.
    await v.page.evaluate(
      `(function () { var r = document.querySelector('#vs-window-range'); r.value = '${sliderAtWindow(60)}'; r.dispatchEvent(new Event('input', { bubbles: true })); })()`,
    );
    const req = await waitPosted(v, 'requestFit', 2);
    assert.equal(req.window_meV, 60);
    assert.equal(req.withScan, false, 'a refit does not rerun the scan');
    const cbm = markOf(run, 'cbm');
    await v.hostPost(hostFitResult(run, req.requestId as number, cbm, 60, 'parabola', false));
    await waitForExpression(v.page, `document.querySelector('.vs-provenance').textContent.indexOf('Window asked: 60 meV') >= 0`);
    // Changing the method refits at once, with a new window scan.
    await v.page.evaluate(
      `(function () { var s = document.querySelector('vscode-single-select.vs-method'); s.value = 'central-4'; s.dispatchEvent(new Event('change')); })()`,
    );
    const byMethod = await waitPosted(v, 'requestFit', 3);
    assert.equal(byMethod.method, 'central-4');
    assert.equal(byMethod.window_meV, 60);
    assert.equal(byMethod.withScan, true);
    assert.ok(isViewToHostMessage(byMethod));
    // The window line sits 60 meV above the CBM.
    const y = Number(await v.page.locator('line.vs-fit-window').getAttribute('y1'));
    const expected = (await v.page.evaluate(
      `(function () { var a = window.valleyscopeBandView; var s = a.screenOf(${cbm.spin}, ${cbm.kIndex}, ${cbm.band0}); return s.y; })()`,
    )) as number;
    // Pixels per eV from two band points at Γ (k index 0), bands 4 and 5.
    const pxSpan = (await v.page.evaluate(
      `(function () { var a = window.valleyscopeBandView; return a.screenOf(0, 0, 3).y - a.screenOf(0, 0, 4).y; })()`,
    )) as number;
    const pxPerEv = pxSpan / (run.bs.energies[0]![4]! - run.bs.energies[0]![3]!);
    // The line marks the widest window the engine used (it widens a window holding too few points).
    const fit60 = hostFitResult(run, 0, cbm, 60, 'parabola', false).extremum;
    const used = Math.max(...fit60.masses.map((m) => m.window_meV));
    assert.ok(used >= 60);
    assert.ok(Math.abs(expected - y - (used / 1000) * pxPerEv) < 0.5, `window line ${used} meV above the CBM`);
    await v.page.close();
  });

  it('keyboard: the plot takes focus visibly; arrows move between extrema; Enter fits the selection', async () => {
    const v = await openWithRun(h, run);
    let onPlot = false;
    for (let i = 0; i < 25 && !onPlot; i++) {
      await v.page.keyboard.press('Tab');
      onPlot = (await v.page.evaluate(`document.activeElement && document.activeElement.classList.contains('vs-plot')`)) as boolean;
    }
    assert.ok(onPlot, 'Tab reaches the plot');
    assert.equal(await v.page.evaluate(`document.activeElement.matches(':focus-visible')`), true);
    assert.equal(await v.page.evaluate(`getComputedStyle(document.activeElement).outlineStyle`), 'solid', 'focus outline visible');
    assert.match((await v.page.locator('.vs-plot').getAttribute('aria-label')) ?? '', /Arrow keys move between band extrema, Enter fits/);
    const cbm = markOf(run, 'cbm');
    await v.page.keyboard.press('ArrowUp');
    assert.deepEqual(
      await v.page.evaluate('window.valleyscopeBandView.selection()'),
      { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0 },
      'first arrow selects the CBM',
    );
    await v.page.keyboard.press('ArrowRight');
    const right = (await v.page.evaluate('window.valleyscopeBandView.selection()')) as FitTarget;
    assert.equal(right.band0, cbm.band0, 'Right stays on the band');
    assert.ok(run.data.ticks.length > 0 && right.kIndex > cbm.kIndex, 'Right moves along the path');
    // The next extremum along the band is where its slope changes sign (a band extremum by definition).
    const E = run.bs.energies[0]!;
    const nb = run.bs.nBands;
    const at = (k: number): number => E[k * nb + right.band0]!;
    for (let k = cbm.kIndex + 1; k < right.kIndex; k++) {
      const dl = at(k) - at(k - 1);
      const dr = at(k + 1) - at(k);
      assert.ok(!(dl * dr < 0), `no extremum skipped at k-point ${k + 1}`);
    }
    await v.page.keyboard.press('ArrowLeft');
    assert.deepEqual(
      await v.page.evaluate('window.valleyscopeBandView.selection()'),
      { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0 },
      'Left comes back',
    );
    await v.page.keyboard.press('ArrowDown');
    const down = (await v.page.evaluate('window.valleyscopeBandView.selection()')) as FitTarget;
    assert.equal(down.band0, cbm.band0 - 1, 'Down moves to the band below');
    const sel = v.page.locator('circle.vs-selection');
    const p = await screenOf(v, down);
    // The ring is redrawn with the next frame after the key: wait for that frame (up to 2 s), then check.
    await waitForExpression(
      v.page,
      `(function () { var c = document.querySelector('circle.vs-selection'); return !!c && Math.abs(Number(c.getAttribute('cx')) - ${p.x}) < 0.01; })()`,
      2000,
    ).catch(() => undefined);
    assert.ok(Math.abs(Number(await sel.getAttribute('cx')) - p.x) < 0.01, 'selection ring drawn at the selection');
    await v.page.keyboard.press('Enter');
    const req = await waitPosted(v, 'requestFit', 1);
    assert.deepEqual({ spin: req.spin, kIndex: req.kIndex, band0: req.band0 }, down);
    assert.ok(isViewToHostMessage(req));
    // + and − zoom about the centre, 0 resets.
    await v.page.keyboard.press('+');
    assert.equal(await v.page.evaluate('window.valleyscopeBandView.transform.k'), 1.5);
    await v.page.keyboard.press('-');
    await v.page.keyboard.press('-');
    assert.ok(
      Math.abs(((await v.page.evaluate('window.valleyscopeBandView.transform.k')) as number) - 1) < 1e-9,
      'zoom never goes below the whole path',
    );
    await v.page.keyboard.press('+');
    await v.page.keyboard.press('0');
    assert.equal(await v.page.evaluate('window.valleyscopeBandView.transform.k'), 1);
    await assertClean(v);
    await v.page.close();
  });

  it('at the VBM: hole masses shown as positive numbers, labelled, and the threefold degeneracy at Γ', async () => {
    const v = await openWithRun(h, run);
    await v.page.focus('.vs-plot');
    await v.page.keyboard.press('ArrowDown'); // nothing selected: Down starts at the VBM
    const vbm = markOf(run, 'vbm');
    assert.deepEqual(await v.page.evaluate('window.valleyscopeBandView.selection()'), {
      spin: vbm.spin,
      kIndex: vbm.kIndex,
      band0: vbm.band0,
    });
    await v.page.keyboard.press('Enter');
    const req = await waitPosted(v, 'requestFit', 1);
    await v.hostPost(hostFitResult(run, req.requestId as number, vbm, 25, 'parabola', true));
    await v.page.waitForSelector('.vs-fit-body:not([hidden])');
    const fit = hostFitResult(run, 0, vbm, 25, 'parabola', false).extremum;
    assert.match((await v.page.locator('.vs-fit-kind').textContent()) ?? '', /Valence-band maximum/);
    const heads = await v.page.locator('.vs-masses thead th').allTextContents();
    const signedCol = heads.indexOf('m* (signed)');
    const holeCol = heads.indexOf('hole mass');
    assert.ok(signedCol > 0 && holeCol === signedCol + 1, `columns ${heads.join(', ')}`);
    const rows = await v.page
      .locator('.vs-masses tbody tr')
      .evaluateAll((trs) => trs.map((tr) => Array.from(tr.querySelectorAll('td'), (td) => td.textContent)));
    assert.equal(rows.length, fit.masses.length);
    fit.masses.forEach((f, i) => {
      assert.ok(f.mass < 0, 'curvature mass negative at a maximum (design.md sign convention)');
      assert.equal(rows[i]![signedCol], f.mass.toPrecision(3).replace('-', '−'), 'signed mass with a true minus sign');
      assert.equal(rows[i]![holeCol], (-f.mass).toPrecision(3), 'hole mass: the same number, positive');
    });
    // Without spin-orbit the top valence level of diamond-structure Si at Γ is threefold degenerate
    // (heavy and light holes plus the split-off band, common practice; physics.md step 7).
    assert.match((await v.page.locator('.vs-degeneracy').textContent()) ?? '', /Bands degenerate here3/);
    await assertClean(v);
    await v.page.close();
  });

  it('a file still being written: a banner says the results are provisional; a failed load shows its sentence', async () => {
    const partial = bandDataFromStructure({ ...run.bs, partial: true }, 'Si (running job)');
    const v = await openWithRun(h, partial);
    const banner = v.page.locator('.vs-banner');
    assert.equal(await banner.isVisible(), true);
    assert.match((await banner.textContent()) ?? '', /Partial data: .* provisional/);
    assert.equal(await banner.getAttribute('role'), 'alert');
    const sentence = 'EIGENVAL, line 1234, column 5: the energy field holds "*******" (a number too wide for its field), not a number.';
    await v.hostPost({ type: HostToViewType.LoadFailed, message: sentence });
    await waitForExpression(v.page, `window.valleyscopeBandView.lastDraw === null`);
    assert.equal(await v.page.locator('.vs-message').textContent(), sentence);
    assert.equal(await v.page.locator('.vs-message').isVisible(), true);
    const off = (await v.page.evaluate('__t.canvasOffset()')) as { w: number; h: number };
    assert.equal(await v.page.evaluate(`__t.opaqueAround(${off.w / 2}, ${off.h / 2}, 30)`), 0, 'no stale bands under the message');
    await assertClean(v);
    await v.page.close();
  });

  it('a growing file (a running job): the view redraws the new k-points and keeps the zoom and selection', async () => {
    // The first 200 k-points as a running job would have written them, then the whole file.
    const nk0 = 200;
    const bs = run.bs;
    const first = bandDataFromStructure(
      {
        ...bs,
        nk: nk0,
        kpoints: bs.kpoints.slice(0, 3 * nk0),
        weights: bs.weights ? bs.weights.slice(0, nk0) : null,
        energies: bs.energies.map((e) => e.slice(0, nk0 * bs.nBands)),
        occupations: bs.occupations ? bs.occupations.map((o) => o.slice(0, nk0 * bs.nBands)) : null,
        labels: bs.labels.filter((l) => l.index < nk0),
        partial: true,
      },
      'Si (EPM)',
    );
    const v = await openWithRun(h, first);
    const cbm = markOf(run, 'cbm');
    await v.page.focus('.vs-plot');
    await v.page.keyboard.press('ArrowUp');
    await v.page.evaluate(`window.valleyscopeBandView.setZoom(1.5, -100, -50)`);
    await v.hostPost(bandDataMessage(run.data));
    await waitForExpression(v.page, `window.valleyscopeBandView.vm.nk === ${run.data.nk}`);
    assert.equal(await v.page.locator('.vs-banner').isVisible(), false, 'no partial-data banner once complete');
    assert.deepEqual(
      await v.page.evaluate('window.valleyscopeBandView.selection()'),
      { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0 },
      'selection kept',
    );
    // Zoom kept: the transform is the same, so a point keeps its place relative to the path's start
    // (the x scale now spans the longer path, so compare the transform, not the pixel).
    assert.deepEqual(
      await v.page.evaluate('(function (t) { return [t.k, t.x, t.y]; })(window.valleyscopeBandView.transform)'),
      [1.5, -100, -50],
    );
    await v.page.evaluate('window.valleyscopeBandView.setZoom(1, 0, 0)');
    // Let the zoom's redraw land before probing pixels (two animation frames).
    await v.page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(() => r(true))))');
    const pts: [number, number, number][] = [];
    for (let k = nk0; k < run.data.nk; k += 9) for (let b = 0; b < 8; b++) pts.push([0, k, b]);
    const res = ((await v.page.evaluate(`__t.probe(${JSON.stringify(pts)}, 2)`)) as Probe[]).filter((r) => r.inside);
    assert.ok(res.length > 50);
    assert.equal(res.filter((r) => !r.hit).length, 0, 'the k-points added by the growth are drawn');
    await assertClean(v);
    await v.page.close();
  });

  it('a k-grid around the CBM: the panel shows the mass tensor and the averaged masses the host computed', async () => {
    // fixtures/epm/si-cbm-grid: 5×5×5 k-points centred on silicon's conduction minimum (same EPM model).
    const grid = await loadRunForView('fixtures/epm/si-cbm-grid', 'Si CBM grid (EPM)');
    const v = await openWithRun(h, grid);
    await v.page.focus('.vs-plot');
    await v.page.keyboard.press('ArrowUp');
    const cbm = markOf(grid, 'cbm');
    await v.page.keyboard.press('Enter');
    const req = await waitPosted(v, 'requestFit', 1);
    assert.deepEqual({ spin: req.spin, kIndex: req.kIndex, band0: req.band0 }, { spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0 });
    const answer = hostFitResult(grid, req.requestId as number, cbm, 25, 'parabola', true);
    const t = answer.extremum.tensor;
    assert.ok(t, 'the core gives a tensor on this grid');
    await v.hostPost(answer);
    await v.page.waitForSelector('.vs-fit-body:not([hidden])');
    const items = await v.page.locator('.vs-tensor li').allTextContents();
    assert.equal(items.length, 3);
    t.principal.forEach((m, i) => assert.ok(items[i]!.startsWith(`${m.toPrecision(3)} mₑ along (`), items[i]));
    assert.match((await v.page.locator('.vs-tensor').textContent()) ?? '', new RegExp(`method ${t.method}`));
    const dl = (await v.page.locator('.vs-degeneracy').textContent()) ?? '';
    const x = answer.extremum;
    if (x.dosMass !== null) assert.ok(dl.includes(`Density-of-states mass${x.dosMass.toPrecision(3)} mₑ`), dl);
    if (x.conductivityMass !== null) assert.ok(dl.includes(`Conductivity mass${x.conductivityMass.toPrecision(3)} mₑ`), dl);
    assert.ok(x.dosMass !== null || x.conductivityMass !== null, 'averaged masses available with the tensor and N_v');
    await assertClean(v);
    await v.page.close();
  });

  it('hover read-out names the k-point, band and energy from the VBM', async () => {
    const v = await openWithRun(h, run);
    const cbm = markOf(run, 'cbm');
    const p = await screenOf(v, cbm);
    const q = (await v.page.evaluate(`__t.pagePoint(${p.x}, ${p.y})`)) as { x: number; y: number };
    await v.page.mouse.move(q.x, q.y);
    await waitForExpression(v.page, `document.querySelector('.vs-readout').textContent.length > 0`);
    const text = (await v.page.locator('.vs-readout').textContent()) ?? '';
    const k = [0, 1, 2].map((i) => run.bs.kpoints[3 * cbm.kIndex + i]!.toFixed(3)).join(', ');
    assert.ok(text.includes(`k = (${k}) (fractional)`), text);
    assert.ok(text.includes(`band ${cbm.band0 + 1}`), text);
    assert.ok(text.includes(`E − E_VBM = ${(cbm.eV - run.data.vbm_eV!).toFixed(4)} eV`), text);
    assert.match(text, /Å⁻¹/, 'cartesian k shown in Å⁻¹');
    await v.page.close();
  });

  it('energy zero: VBM or as written (this file gives no Fermi level)', async () => {
    const v = await openWithRun(h, run);
    const options = await v.page
      .locator('vscode-single-select.vs-ref vscode-option')
      .evaluateAll((os) => os.map((o) => o.getAttribute('value')));
    assert.deepEqual(options, ['vbm', 'raw'], 'EIGENVAL carries no Fermi energy, so that reference is not offered');
    const ticksBefore = await v.page.locator('.vs-axis-y text').allTextContents();
    assert.ok(ticksBefore.includes('0'));
    await v.page.evaluate(
      `(function () { var s = document.querySelector('vscode-single-select.vs-ref'); s.value = 'raw'; s.dispatchEvent(new Event('change')); })()`,
    );
    assert.equal(await v.page.locator('.vs-y-title').textContent(), 'E (eV)');
    assert.deepEqual(
      await v.page.evaluate('window.__state'),
      { reference: 'raw', spin: 'up', window_meV: 25, method: 'parabola', fits: [] },
      'the choice is kept in the webview state',
    );
    assert.equal(await v.page.locator('line.vs-zero').count(), 0);
    const ticksAfter = (await v.page.locator('.vs-axis-y text').allTextContents()).map((t) => Number(t.replace('−', '-')));
    // Raw energies of the model: VBM at 10.48 eV (fixtures/epm/README.md), so the axis spans it.
    assert.ok(
      Math.min(...ticksAfter) < run.data.vbm_eV! && Math.max(...ticksAfter) > run.data.vbm_eV!,
      `raw axis spans the VBM: ${ticksAfter.join(' ')}`,
    );
    await v.page.close();
  });

  it('zoom and pan: full detail on zoom, bands stay on their data', async () => {
    const v = await openWithRun(h, run);
    const cbm = markOf(run, 'cbm');
    const p0 = await screenOf(v, cbm);
    const qf = (await v.page.evaluate(`__t.pagePoint(${p0.x}, ${p0.y})`)) as { x: number; y: number };
    // Mouse events carry whole CSS pixels: the zoom centre is the rounded pointer position.
    const q = { x: Math.round(qf.x), y: Math.round(qf.y) };
    const ptr = { x: p0.x + (q.x - qf.x), y: p0.y + (q.y - qf.y) };
    const a0 = await screenOf(v, { spin: 0, kIndex: cbm.kIndex - 1, band0: cbm.band0 });
    const b0 = await screenOf(v, { spin: 0, kIndex: cbm.kIndex + 1, band0: cbm.band0 });
    await v.page.mouse.move(q.x, q.y);
    for (let i = 0; i < 5; i++) await v.page.mouse.wheel(0, -300);
    await v.page.waitForTimeout(300);
    const a = await screenOf(v, { spin: 0, kIndex: cbm.kIndex - 1, band0: cbm.band0 });
    const b = await screenOf(v, { spin: 0, kIndex: cbm.kIndex + 1, band0: cbm.band0 });
    assert.ok(b.x - a.x > 40, `zoomed in: neighbouring k-points now ${(b.x - a.x).toFixed(0)} px apart`);
    const k = (b.x - a.x) / (b0.x - a0.x);
    const p1 = await screenOf(v, cbm);
    // Zooming about the pointer scales every offset from it by k (and leaves the pointer's data point in place).
    assert.ok(
      Math.abs(p1.x - ptr.x - k * (p0.x - ptr.x)) < 1 && Math.abs(p1.y - ptr.y - k * (p0.y - ptr.y)) < 1,
      `wheel zoom about the pointer (${JSON.stringify([p0, p1, k])})`,
    );
    // Drag to pan.
    await v.page.mouse.move(q.x, q.y);
    await v.page.mouse.down();
    await v.page.mouse.move(q.x - 100, q.y + 30, { steps: 5 });
    await v.page.mouse.up();
    await v.page.waitForTimeout(100);
    const p2 = await screenOf(v, cbm);
    assert.ok(Math.abs(p2.x - p1.x + 100) < 2 && Math.abs(p2.y - p1.y - 30) < 2, 'drag pans the plot');
    assert.equal((await v.posted()).filter((m) => m.type === 'requestFit').length, 0, 'a drag is not a click');
    const pts: [number, number, number][] = [];
    for (let k = cbm.kIndex - 3; k <= cbm.kIndex + 3; k++) for (let bb = 0; bb < run.data.nBands; bb++) pts.push([0, k, bb]);
    const res = (await v.page.evaluate(`__t.probe(${JSON.stringify(pts)}, 2)`)) as Probe[];
    const inside = res.filter((r) => r.inside);
    assert.ok(inside.length >= 5);
    assert.equal(inside.filter((r) => !r.hit).length, 0, 'zoomed bands drawn at their data');
    assert.equal(await v.page.evaluate('window.valleyscopeBandView.lastDraw.mode'), 'lines');
    await v.page.locator('vscode-button.vs-reset').click();
    await v.page.waitForTimeout(100);
    const p3 = await screenOf(v, cbm);
    assert.ok(Math.hypot(p3.x - p0.x, p3.y - p0.y) < 0.5, 'Reset zoom restores the first view');
    await v.page.close();
  });

  it('saves the fits made; read-only workspaces disable saving and say why', async () => {
    const v = await openWithRun(h, run);
    await fitAtCbm(v, run);
    await v.page.locator('vscode-button.vs-save').click();
    const save = await waitPosted(v, 'save', 1);
    assert.ok(isViewToHostMessage(save), 'save passes the protocol validator');
    const cbm = markOf(run, 'cbm');
    assert.deepEqual(save.entries, [{ spin: cbm.spin, kIndex: cbm.kIndex, band0: cbm.band0, window_meV: 25, method: 'parabola' }]);
    await v.hostPost({ type: HostToViewType.SaveResult, ok: true, message: 'Saved 1 entry to fixtures/epm/si/EIGENVAL.valleys.json.' });
    // The host's sentence is shown as it is (no second "Saved:" in front of it); the message arrives asynchronously.
    await waitForExpression(v.page, `document.querySelector('.vs-status').textContent !== 'Saving …'`);
    assert.equal((await v.page.locator('.vs-status').textContent()) ?? '', 'Saved 1 entry to fixtures/epm/si/EIGENVAL.valleys.json.');
    const reason = 'Restricted mode: this workspace is not trusted, so Valleyscope does not write files.';
    await v.hostPost({ type: HostToViewType.Environment, environment: { theme: 'dark', readOnly: true, readOnlyReason: reason } });
    await waitForExpression(v.page, `document.querySelector('vscode-button.vs-save').disabled === true`);
    assert.equal(await v.page.locator('.vs-save-note').textContent(), reason);
    assert.equal(await v.page.locator('vscode-button.vs-save').getAttribute('title'), reason);
    await v.page.locator('vscode-button.vs-save').click({ force: true });
    await v.hostPost({ type: HostToViewType.SaveRequest });
    await v.page.waitForTimeout(100);
    assert.equal((await v.posted()).filter((m) => m.type === 'save').length, 1, 'no save posted while read-only');
    await v.page.close();
  });

  it('exports SVG and PNG at publication size with axis titles in units', async () => {
    const v = await openWithRun(h, run);
    await fitAtCbm(v, run);
    await v.page.locator('vscode-button.vs-export-svg').click();
    const svg = await waitPosted(v, 'export', 1);
    assert.ok(isViewToHostMessage(svg));
    assert.equal(svg.format, 'svg');
    const text = svg.data as string;
    assert.match(text, /width="85mm" height="64mm"/, 'one journal column wide (85 mm, common practice)');
    assert.ok(text.includes('k (Å⁻¹)'));
    assert.ok(text.includes('E − E<tspan baseline-shift="sub" font-size="6">VBM</tspan> (eV)'));
    assert.equal((text.match(/stroke="#1b7f3b"/g) ?? []).length, 2, 'both fitted curves exported');
    const parsed = (await v.page.evaluate(
      `(function (s) { var d = new DOMParser().parseFromString(s, 'image/svg+xml'); return { err: d.getElementsByTagName('parsererror').length, labels: Array.prototype.map.call(d.querySelectorAll('text'), function (t) { return t.textContent; }) }; })(${JSON.stringify(text)})`,
    )) as { err: number; labels: string[] };
    assert.equal(parsed.err, 0, 'the SVG is well-formed XML');
    for (const l of ['Γ', 'X', 'L', 'K|U']) assert.ok(parsed.labels.includes(l), `label ${l} in the export`);
    writeFileSync(`${ARTIFACTS}/bandview-export.svg`, text);
    await v.page.locator('vscode-button.vs-export-png').click();
    await waitPosted(v, 'export', 2);
    const pngBase64 = (await v.page.evaluate(`(function () {
      var b = window.__posted.filter(function (x) { return x.type === 'export'; })[1].data, s = '';
      for (var i = 0; i < b.length; i++) s += String.fromCharCode(b[i]);
      return btoa(s);
    })()`)) as string;
    writeFileSync(`${ARTIFACTS}/bandview-export.png`, Buffer.from(pngBase64, 'base64'));
    const png = (await v.page.evaluate(`(function () {
      var m = window.__posted.filter(function (x) { return x.type === 'export'; })[1];
      var b = m.data; var dv = new DataView(b.buffer, b.byteOffset, b.byteLength);
      return { format: m.format, sig: Array.prototype.slice.call(b, 1, 4).map(function (c) { return String.fromCharCode(c); }).join(''), w: dv.getUint32(16), h: dv.getUint32(20), width: m.width, height: m.height, bytes: b.byteLength };
    })()`)) as { format: string; sig: string; w: number; h: number; width: number; height: number; bytes: number };
    assert.equal(png.format, 'png');
    assert.equal(png.sig, 'PNG', 'PNG signature (ISO/IEC 15948)');
    // 85 mm × 64 mm at 600 dpi.
    assert.equal(png.w, Math.round((85 / 25.4) * 600));
    assert.equal(png.h, Math.round((64 / 25.4) * 600));
    assert.equal(png.width, png.w);
    assert.ok(png.bytes > 20_000, `a drawn image, not a blank one (${png.bytes} bytes)`);
    await assertClean(v);
    await v.page.close();
  });

  for (const theme of ['dark', 'light', 'hc'] as TestTheme[]) {
    it(`screenshot with a fit overlay, ${theme} theme (test-artifacts/bandview-${theme}.png)`, async () => {
      const v = await openWithRun(h, run, theme, { width: 1280, height: 900 });
      await fitAtCbm(v, run);
      // Zoom towards the CBM (wheel at the marker) so the fitted curves are large enough to see.
      const cbm = markOf(run, 'cbm');
      const p = await screenOf(v, cbm);
      const q = (await v.page.evaluate(`__t.pagePoint(${p.x}, ${p.y})`)) as { x: number; y: number };
      await v.page.mouse.move(q.x, q.y);
      for (let i = 0; i < 4; i++) await v.page.mouse.wheel(0, -250);
      await v.page.waitForTimeout(200);
      await v.page.mouse.move(q.x + 60, q.y - 40);
      await v.page.waitForTimeout(100);
      const path = `${ARTIFACTS}/bandview-${theme}.png`;
      await v.page.screenshot({ path });
      // The page takes the theme's editor background, and the bands its chart colours.
      const bg = await v.page.evaluate(`getComputedStyle(document.body).backgroundColor`);
      const [r, g, b] = hexToRgb(THEME_VARS[theme]['--vscode-editor-background']!);
      assert.equal(bg, `rgb(${r}, ${g}, ${b})`);
      // Zoomed at the CBM: the conduction bands (theme orange) fill the view.
      const orange = hexToRgb(THEME_VARS[theme]['--vscode-charts-orange']!);
      assert.ok(((await v.page.evaluate(`__t.countColour(${JSON.stringify(orange)}, 24)`)) as number) > 100, 'bands in the theme colour');
      const fitStroke = await v.page
        .locator('path.vs-fit-curve')
        .first()
        .evaluate((el) => getComputedStyle(el).stroke);
      const [fr, fg, fb] = hexToRgb(THEME_VARS[theme]['--vscode-charts-green']!);
      assert.equal(fitStroke, `rgb(${fr}, ${fg}, ${fb})`, 'fitted curve in the theme green');
      await assertClean(v);
      await v.page.close();
    });
  }
});
