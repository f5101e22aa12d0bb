/**
 * The fit panel as a practitioner reads it, in headless Chromium: silicon from the empirical pseudopotential
 * model (fixtures/epm/si, Cohen & Bergstresser, Phys. Rev. 141, 789 (1966)), fits answered by the extension's
 * own fit service. Branch column at a degenerate edge, provenance table, each warning once, method
 * descriptions, the logarithmic window slider, the method spread of finite differences, Kane α, and the
 * symmetry lines in Light High Contrast.
 */
import assert from 'node:assert/strict';
import { ARTIFACTS, markOf, openWithRun, siliconSession, waitPosted, type ViewPage } from './support/bandViewHarness';
import { hostFitResult, type LoadedRun } from './support/coreBandData';
import { waitForExpression } from './support/pageHelpers';
import { THEME_VARS } from './support/themes';
import type { MassFit } from '../../src/protocol';
import { sliderAtWindow, windowAtSlider, WINDOW_SLIDER_STEPS } from '../../webview/bandView/windowSlider';
import { METHOD_DESCRIPTIONS } from '../../src/core/analysis/methods';

/** Select an extremum with the keyboard (Down from nothing: the VBM; Up: the CBM), Enter, answer the request. */
async function fitByKey(
  v: ViewPage,
  run: LoadedRun,
  key: 'ArrowDown' | 'ArrowUp',
  method: string,
  window_meV: number,
  n: number,
): Promise<MassFit[]> {
  await v.page.focus('.vs-plot');
  if (n === 1) await v.page.keyboard.press(key);
  if (method !== 'parabola') {
    await v.page.evaluate(
      `(function () { var s = document.querySelector('vscode-single-select.vs-method'); s.value = ${JSON.stringify(method)}; s.dispatchEvent(new Event('change')); })()`,
    );
  }
  await v.page.keyboard.press('Enter');
  const req = await waitPosted(v, 'requestFit', n);
  const t = { spin: req.spin as 0 | 1, kIndex: req.kIndex as number, band0: req.band0 as number };
  const answer = hostFitResult(run, req.requestId as number, t, window_meV, method, true);
  await v.hostPost(answer);
  await v.page.waitForSelector('.vs-fit-body:not([hidden])');
  await waitForExpression(v.page, `document.querySelectorAll('.vs-masses tbody tr').length === ${answer.extremum.masses.length}`);
  return answer.extremum.masses;
}

function cells(v: ViewPage, selector: string): Promise<string[][]> {
  return v.page
    .locator(selector)
    .evaluateAll((trs) => trs.map((tr) => Array.from(tr.querySelectorAll('td'), (td) => td.textContent ?? '')));
}

describe('fit panel (headless Chromium, silicon EPM)', function () {
  this.timeout(90_000);
  // The harness and the run, set up once by the shared before() hook.
  const session = siliconSession();

  it('at the threefold VBM: a branch column, rows told apart by direction and branch, provenance as a table, each warning once', async () => {
    const v = await openWithRun(session.h, session.run);
    const masses = await fitByKey(v, session.run, 'ArrowDown', 'parabola', 25, 1);
    // Without spin-orbit the top valence level of diamond-structure Si at Γ is threefold degenerate (heavy,
    // light and split-off holes; common practice): every direction carries three branches.
    const heads = await v.page.locator('.vs-masses thead th').allTextContents();
    assert.deepEqual(heads.slice(0, 2), ['towards', 'branch']);
    const rows = await cells(v, '.vs-masses tbody tr');
    assert.equal(rows.length, masses.length);
    const dirs = [...new Set(masses.map((f) => f.towards))];
    assert.ok(dirs.length >= 2, 'the path leaves Γ in more than one direction');
    for (const d of dirs) {
      const branches = rows.filter((r) => r[0] === d).map((r) => r[1]);
      assert.deepEqual(branches, ['1', '2', '3'], `towards ${d}: branches 1, 2, 3`);
    }
    assert.equal(new Set(rows.map((r) => `${r[0]}/${r[1]}`)).size, rows.length, 'no two rows read alike');
    rows.forEach((r, i) => assert.equal(r[1], String(masses[i]!.branch)));
    // Provenance: one table row per direction and branch, with method, window used, points.
    const prov = await cells(v, '.vs-provenance-table tbody tr');
    assert.equal(prov.length, masses.length);
    prov.forEach((r, i) => {
      const f = masses[i]!;
      assert.equal(r[0], `${f.towards} (branch ${f.branch})`);
      assert.equal(r[1], f.method);
      assert.equal(r[3], String(f.points));
    });
    assert.match((await v.page.locator('.vs-provenance').textContent()) ?? '', /parabola: Least-squares parabola/);
    // Each warning once: the window-grew sentences of several directions and branches are one line.
    const grew = masses.filter((f) => (f.warnings ?? []).some((w) => /window grew/.test(w)));
    assert.ok(grew.length > 1, `control: several fits widened their window (${grew.length})`);
    const lines = await v.page.locator('.vs-fit-warnings li').allTextContents();
    assert.equal(new Set(lines).size, lines.length, 'no line repeated');
    const grewLines = lines.filter((l) => /window grew/.test(l));
    assert.equal(grewLines.length, 1, grewLines.join('\n'));
    for (const f of grew) assert.ok(grewLines[0]!.includes(f.towards), `names ${f.towards}`);
    // Nothing cut off: the table's last column ends inside the side panel (1280 px wide view).
    const sideRight = (await v.page.locator('.vs-side').boundingBox())!;
    const lastHead = (await v.page.locator('.vs-masses thead th').last().boundingBox())!;
    assert.ok(
      lastHead.x + lastHead.width <= sideRight.x + sideRight.width + 0.5,
      `points column at ${lastHead.x + lastHead.width} inside ${sideRight.x + sideRight.width}`,
    );
    // The DOS mass of the branches from path directions only is shown with its error and the word path-limited
    // (the core estimates it from the path; a number without that would be quoted as a full-sphere value).
    const dl = (await v.page.locator('.vs-degeneracy').textContent()) ?? '';
    assert.match(dl, /Density-of-states mass[\d.]+ ± [\d.]+ mₑ \(path-limited\)/);
    // In the 300 px side panel the provenance rows are label–value cards, not a table to scroll sideways.
    const fits = (await v.page.evaluate(`(function () {
      var w = document.querySelector('.vs-provenance-scroll');
      var td = document.querySelector('.vs-provenance-table tbody td:nth-child(4)');
      return [w.scrollWidth <= w.clientWidth + 1, getComputedStyle(td, '::before').content];
    })()`)) as [boolean, string];
    assert.deepEqual(fits, [true, '"points"']);
    await v.page.locator('.vs-provenance').scrollIntoViewIfNeeded();
    await v.page.screenshot({ path: `${ARTIFACTS}/fitpanel-vbm-branches.png` });
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });

  it('at the non-degenerate CBM there is no branch column (control)', async () => {
    const v = await openWithRun(session.h, session.run);
    const masses = await fitByKey(v, session.run, 'ArrowUp', 'parabola', 25, 1);
    assert.ok(masses.every((f) => f.branch === undefined));
    const heads = await v.page.locator('.vs-masses thead th').allTextContents();
    assert.ok(!heads.includes('branch'), heads.join(', '));
    await v.page.close();
  });

  it('the window slider is logarithmic like the scan plot: equal distances are equal ratios, and it reports what it sets', async () => {
    // Log scale (definition): 1 → 10 meV and 10 → 100 meV take the same slider distance.
    assert.ok(
      Math.abs(sliderAtWindow(10) - sliderAtWindow(1) - (sliderAtWindow(100) - sliderAtWindow(10))) <= 1,
      'within one step of rounding',
    );
    assert.equal(windowAtSlider(0), 1);
    assert.equal(windowAtSlider(WINDOW_SLIDER_STEPS), 300);
    assert.equal(windowAtSlider(WINDOW_SLIDER_STEPS / 2), Math.round(Math.sqrt(300))); // geometric mean of 1 and 300
    const v = await openWithRun(session.h, session.run);
    await fitByKey(v, session.run, 'ArrowUp', 'parabola', 25, 1);
    const range = v.page.locator('#vs-window-range');
    assert.equal(await range.getAttribute('max'), String(WINDOW_SLIDER_STEPS));
    assert.equal(
      Number(await range.inputValue()),
      Math.round((WINDOW_SLIDER_STEPS * Math.log(25)) / Math.log(300)),
      'thumb at log(25)/log(300)',
    );
    // Dragging to the middle asks for the geometric mean.
    await v.page.evaluate(
      `(function () { var r = document.querySelector('#vs-window-range'); r.value = '${WINDOW_SLIDER_STEPS / 2}'; r.dispatchEvent(new Event('input', { bubbles: true })); })()`,
    );
    const req = await waitPosted(v, 'requestFit', 2);
    assert.equal(req.window_meV, 17);
    assert.equal(await v.page.evaluate(`document.querySelector('.vs-window-field').value`), '17');
    // The scan plot's window axis is logarithmic too: ticks 10 → 20 and 50 → 100 (both ×2) are equally far apart.
    assert.equal(await v.page.locator('.vs-scan svg').getAttribute('data-x-scale'), 'log');
    const ticks = (await v.page
      .locator('.vs-scan svg .vs-axis')
      .first()
      .evaluate((g) =>
        Array.from(g.querySelectorAll('.tick'), (t) => [
          Number(t.textContent),
          Number((t.getAttribute('transform') ?? '').replace(/[^\d.,-]/g, '').split(',')[0]),
        ]),
      )) as [number, number][];
    const at = new Map(ticks);
    const pairs = [
      [1, 2],
      [2, 5],
      [5, 10],
      [10, 20],
      [20, 50],
      [50, 100],
      [100, 200],
    ].filter(([a, b]) => at.has(a!) && at.has(b!));
    assert.ok(pairs.length >= 2, `ticks ${JSON.stringify(ticks)}`);
    // On a log axis the pixel distance per decade is constant: distance / ln(ratio) agrees for every pair.
    const perLn = pairs.map(([a, b]) => (at.get(b!)! - at.get(a!)!) / Math.log(b! / a!));
    for (const p of perLn) assert.ok(Math.abs(p - perLn[0]!) < 0.02 * perLn[0]!, `px per ln-unit ${perLn.join(', ')}`);
    await v.page.close();
  });

  it('central differences: the uncertainty is the spread against the parabola at the same window, labelled so', async () => {
    const v = await openWithRun(session.h, session.run);
    const masses = await fitByKey(v, session.run, 'ArrowUp', 'central-2', 25, 1);
    // The parabola at the same point and window, from the fit service independently.
    const cbm = markOf(session.run, 'cbm');
    const parabola = hostFitResult(session.run, 0, cbm, 25, 'parabola', false).extremum.masses;
    const withSpread = masses.filter((f) => f.methodSpread);
    assert.ok(withSpread.length > 0, 'some direction was fitted by a finite difference');
    const heads = await v.page.locator('.vs-masses thead th').allTextContents();
    const col = heads.indexOf('±');
    const rows = await cells(v, '.vs-masses tbody tr');
    for (const f of withSpread) {
      const p = parabola.find((q) => q.towards === f.towards)!;
      const spread = Math.abs(f.mass - p.mass);
      assert.ok(Math.abs(f.methodSpread!.spread - spread) <= 1e-12 * Math.max(1, spread), `towards ${f.towards}`);
      const row = rows[masses.indexOf(f)]!;
      assert.match(row[col]!, /spread$/, 'marked as a spread, not a stderr');
      // Finite differences pass through their points: the rounding stderr alone is far smaller than the spread here.
      assert.ok(f.stderr < spread, `stderr ${f.stderr} < spread ${spread}`);
    }
    const cell = v.page.locator('.vs-masses td.vs-spread').first();
    assert.match((await cell.getAttribute('title')) ?? '', /parabola fit at the same window setting \(25\.0 meV\)/);
    assert.ok(await v.page.locator('.vs-provenance-table th', { hasText: 'spread vs parabola' }).count());
    await v.page.close();
  });

  it('Kane fits show α in the provenance table; the method list carries one-line descriptions', async () => {
    const v = await openWithRun(session.h, session.run);
    const masses = await fitByKey(v, session.run, 'ArrowUp', 'kane', 100, 1);
    const heads = await v.page.locator('.vs-provenance-table thead th').allTextContents();
    const col = heads.indexOf('Kane α (eV⁻¹)');
    assert.ok(col > 0, heads.join(', '));
    const rows = await cells(v, '.vs-provenance-table tbody tr');
    masses.forEach((f, i) => {
      if (f.alpha_per_eV !== undefined) assert.equal(rows[i]![col], f.alpha_per_eV.toPrecision(3).replace('-', '−'));
    });
    assert.ok(masses.some((f) => f.alpha_per_eV !== undefined));
    const opts = (await v.page
      .locator('vscode-single-select.vs-method vscode-option')
      .evaluateAll((os) => os.map((o) => [o.getAttribute('value'), o.getAttribute('description')]))) as [string, string][];
    assert.ok(opts.length >= 5);
    for (const [id, d] of opts) assert.equal(d, METHOD_DESCRIPTIONS[id], id);
    assert.match((await v.page.locator('.vs-method-note').textContent()) ?? '', /^kane: Kane dispersion/);
    await v.page.close();
  });

  it('Light High Contrast: the symmetry lines are not drawn in a band colour', async () => {
    const v = await openWithRun(session.h, session.run, 'hcLight');
    const stroke = await v.page
      .locator('line.vs-sym-line')
      .first()
      .evaluate((l) => getComputedStyle(l).stroke);
    const hex = (c: string): string => c.toLowerCase();
    const toRgb = (x: string): string =>
      `rgb(${parseInt(x.slice(1, 3), 16)}, ${parseInt(x.slice(3, 5), 16)}, ${parseInt(x.slice(5, 7), 16)})`;
    const vars = THEME_VARS.hcLight;
    // Control: in this theme the contrast border and the first band colour coincide.
    assert.equal(hex(vars['--vscode-contrastBorder']!), hex(vars['--vscode-charts-blue']!));
    assert.notEqual(stroke, toRgb(vars['--vscode-charts-blue']!), 'not the filled-band colour');
    assert.notEqual(stroke, toRgb(vars['--vscode-charts-orange']!), 'not the empty-band colour');
    assert.equal(stroke, toRgb(vars['--vscode-editor-foreground']!));
    await v.page.screenshot({ path: `${ARTIFACTS}/bandview-hc-light.png` });
    await v.page.close();
  });
});
