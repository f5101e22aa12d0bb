/**
 * The compare view bundle (dist/webview/compareView.js) in Debian's Chromium, inside the extension's HTML
 * shell and content security policy, fed the way the host feeds it: the demo's strained-silicon series
 * (fixtures/demo/si-strain; bands of Cohen & Bergstresser's empirical pseudopotential model, Phys. Rev. 141,
 * 789 (1966), in VASP layouts) read and analysed by the core, arranged by the host's own compareViewData.ts.
 * Reference values come from the core's analysis of the same files, read in this process.
 */
import assert from 'node:assert/strict';
import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { bandRunOf, buildCompareTable, type CompareEntry } from '../../src/extension/compareViewData';
import { compositionOf } from '../../src/core/compare/structureDescriptors';
import { labelledLines } from '../../src/core/lattice/pathPosition';
import { loadRun } from '../../src/core/load';
import { nodeFileAccessor } from '../../src/cli/nodeFileAccessor';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../src/core/analysis/analyze';
import { pathGeometry, type PathGeometry } from '../../src/core/lattice/kpath';
import { crystalSymmetry, ensureSymmetryReady } from '../../src/core/lattice/symmetry';
import {
  CompareHostToViewType,
  decodeArray,
  encodeArrayBase64,
  isCompareViewToHostMessage,
  isViewToHostMessage,
  type CompareBandRun,
  type CompareTable,
  type EncodedArray,
} from '../../src/protocol';
import type { BandStructure, Report } from '../../src/core/model';
import { CHROMIUM_ARGS, CHROMIUM_PATH, testPageHtml } from './support/bandViewHarness';
import { BODY_CLASS, THEME_VARS } from './support/themes';
import { hexToRgb, waitForExpression } from './support/pageHelpers';
import { buildViewBundle, startPageServer, type PageServer } from './support/pageHarness';

const ARTIFACTS = 'test-artifacts';
const SERIES = join('fixtures', 'demo', 'si-strain');
const NAMES = ['01_biaxial-1.00pct', '02_biaxial-0.50pct', '03_biaxial+0.00pct', '04_biaxial+0.50pct', '05_biaxial+1.00pct'];

interface Run {
  name: string;
  bs: BandStructure;
  report: Report;
  geometry: PathGeometry;
}

async function readRun(dir: string, name: string): Promise<Run> {
  const bs = await loadRun(nodeFileAccessor, dir);
  return { name, bs, report: analyzeBandStructure(bs, DEFAULT_SETTINGS), geometry: pathGeometry(bs) };
}

/** As the panel builds it (compareViewPanel.ts crystalOf): rotations, lattice type, lattice points, composition. */
function entryOf(run: Run, id: string): CompareEntry {
  const sym = run.bs.structure ? crystalSymmetry(run.bs.structure) : null;
  return {
    id,
    name: run.name,
    origin: 'data',
    annotations: 'none',
    staleReasons: [],
    run: {
      name: id,
      report: run.report,
      lattice: run.bs.lattice,
      rotations: sym ? sym.rotations : null,
      latticeType: sym ? sym.bravaisClass : null,
      latticePointsPerCell: sym ? sym.latticePointsPerCell : null,
      composition: run.bs.structure ? compositionOf(run.bs.structure.species) : null,
      pathLines: labelledLines(run.bs),
      origin: 'data',
    },
    error: null,
    canOverlay: true,
  };
}

const b64 = (a: EncodedArray): EncodedArray => encodeArrayBase64(decodeArray(a), a.dtype);
function jsonBands(r: CompareBandRun): CompareBandRun {
  return { ...r, distance: b64(r.distance), energies: r.energies.map(b64) };
}

/** Stub of VS Code's webview API, run before the bundle (records what the view posts). */
const STUB = `
window.__posted = []; window.__cspViolations = []; window.__state = undefined;
document.addEventListener('securitypolicyviolation', function (e) { window.__cspViolations.push(e.violatedDirective + ' ' + e.blockedURI); });
window.acquireVsCodeApi = function () { return {
  postMessage: function (m) { window.__posted.push(JSON.parse(JSON.stringify(m))); },
  getState: function () { return window.__state; }, setState: function (s) { window.__state = s; } }; };
window.__hostPost = function (m) { window.postMessage(m, '*'); };
document.body.className = 'vscode-dark'; document.body.setAttribute('data-vscode-theme-kind', 'vscode-dark');
`;

interface Harness {
  browser: Browser;
  origin: string;
  server: PageServer;
}

async function startHarness(): Promise<Harness> {
  if (!existsSync(CHROMIUM_PATH)) throw new Error(`${CHROMIUM_PATH} is missing: run scripts/install-test-deps.sh`);
  const bundle = await buildViewBundle('webview/compareView/main.ts', 'compareView');
  const server = await startPageServer({
    bundlePath: '/compareView.js',
    bundle,
    stub: STUB,
    page: (_url, origin) => testPageHtml(origin, `${origin}/compareView.js`, 'Compare view test', 'dark'),
  });
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
  return { browser, origin: server.origin, server };
}

interface View {
  page: Page;
  errors: string[];
}

async function openView(h: Harness, table: CompareTable): Promise<View> {
  const page = await h.browser.newPage({ viewport: { width: 1400, height: 1000 }, deviceScaleFactor: 1 });
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(`console: ${m.text()}`);
  });
  assert.ok(BODY_CLASS.dark);
  await page.goto(`${h.origin}/`);
  await waitForExpression(page, 'window.valleyscopeCompareView !== undefined');
  await waitForExpression(page, `window.__posted.some(function (m) { return m.type === 'compareReady'; })`);
  await page.evaluate((m) => (window as unknown as { __hostPost(m: unknown): void }).__hostPost(m), {
    type: CompareHostToViewType.Table,
    table,
    environment: { theme: 'dark', readOnly: false, readOnlyReason: null },
  } as object);
  await page.locator('table.cv-table tbody tr').first().waitFor();
  return { page, errors };
}

/** Ticks "More columns" (the compact default set hides directional masses, valleys, strains). */
async function showMoreColumns(v: View): Promise<void> {
  await v.page.locator('vscode-checkbox.cv-more-columns').click();
  await v.page.locator('table.cv-table th[data-key="volumeStrain"]').waitFor();
}

async function posted(v: View): Promise<Array<Record<string, unknown>>> {
  return v.page.evaluate(() => (window as unknown as { __posted: Array<Record<string, unknown>> }).__posted);
}

async function clean(v: View): Promise<void> {
  assert.deepEqual(
    await v.page.evaluate(() => (window as unknown as { __cspViolations: string[] }).__cspViolations),
    [],
    'no content-security-policy violation',
  );
  assert.deepEqual(v.errors, [], 'no error in the page');
  for (const m of await posted(v))
    assert.ok(isCompareViewToHostMessage(m), `the view posts only valid compare messages: ${JSON.stringify(m).slice(0, 200)}`);
}

/** Answers the view's band requests as the host does (compareViewData.bandRunOf on the runs read here). */
async function answerBands(v: View, runs: Map<string, Run>, count: number): Promise<void> {
  await waitForExpression(v.page, `window.__posted.filter(function (m) { return m.type === 'compareRequestBands'; }).length >= ${count}`);
  const reqs = (await posted(v)).filter((m) => m.type === 'compareRequestBands');
  const req = reqs[count - 1]!;
  const out = (req.rowIds as string[]).map((id) => jsonBands(bandRunOf(id, runs.get(id)!.name, runs.get(id)!)));
  await v.page.evaluate((m) => (window as unknown as { __hostPost(m: unknown): void }).__hostPost(m), {
    type: CompareHostToViewType.Bands,
    requestId: req.requestId,
    runs: out,
    missing: [],
  } as object);
}

/** Canvas pixels near a colour, in all rows or in rows [y0, y1]. */
async function countColour(v: View, rgb: [number, number, number], tol: number, rows?: [number, number]): Promise<number> {
  return v.page.evaluate(
    ([c, t, r]) => {
      const cv = document.querySelector('canvas.cv-overlay-canvas') as HTMLCanvasElement;
      const d = cv.getContext('2d')!.getImageData(0, 0, cv.width, cv.height).data;
      let n = 0;
      const y0 = r ? Math.max(0, r[0]) : 0;
      const y1 = r ? Math.min(cv.height - 1, r[1]) : cv.height - 1;
      for (let y = y0; y <= y1; y++) {
        for (let x = 0; x < cv.width; x++) {
          const i = (y * cv.width + x) * 4;
          if (d[i + 3]! > 150 && Math.abs(d[i]! - c[0]) <= t && Math.abs(d[i + 1]! - c[1]) <= t && Math.abs(d[i + 2]! - c[2]) <= t) n++;
        }
      }
      return n;
    },
    [rgb, tol, rows ?? null] as const,
  );
}

describe('compare view in headless Chromium (demo strain series)', function () {
  this.timeout(120_000);
  let h: Harness;
  const runs = new Map<string, Run>();
  let table: CompareTable;

  before(async function () {
    mkdirSync(ARTIFACTS, { recursive: true });
    await ensureSymmetryReady();
    const list: Run[] = [];
    for (const n of NAMES) list.push(await readRun(join(SERIES, n), `si-strain/${n}/EIGENVAL`));
    list.push(await readRun(join('fixtures', 'demo', 'si-bulk'), 'si-bulk/EIGENVAL'));
    list.forEach((r, i) => runs.set(`r${i}`, r));
    // The strain series only in the table; the bulk run (another path) joins in the side-by-side check.
    table = buildCompareTable(
      list.slice(0, NAMES.length).map((r, i) => entryOf(r, `r${i}`)),
      null,
      false,
    );
    h = await startHarness();
  });
  after(async () => {
    await h?.browser.close();
    await h?.server.close();
  });

  it('lists the demo series with the gap, edges and structure of each run, and the cautions', async () => {
    const v = await openView(h, table);
    const names = await v.page.evaluate(() =>
      (window as unknown as { valleyscopeCompareView: { visibleRowNames(): string[] } }).valleyscopeCompareView.visibleRowNames(),
    );
    assert.deepEqual(
      names,
      NAMES.map((n) => `si-strain/${n}/EIGENVAL`),
      'one row per run, by name',
    );
    // Gap cells equal the core's analysis of the same files (4 decimals, as the column shows them).
    const gaps = await v.page.locator('table.cv-table tbody td[data-key="gap"]').allInnerTexts();
    NAMES.forEach((_, i) => assert.equal(gaps[i], runs.get(`r${i}`)!.report.gap!.eV.toFixed(4), `gap of ${NAMES[i]}`));
    // Volume strain of the first run against the reference (the first run itself): zero (definition).
    await showMoreColumns(v);
    const strains = await v.page.locator('table.cv-table tbody td[data-key="volumeStrain"]').allInnerTexts();
    assert.equal(strains[0], '0.000');
    // Biaxial strain ε∥ = −1 %, ε⊥ = −2 (C12/C11) ε∥ with C11 = 165.8, C12 = 63.9 GPa (demo README, handbook
    // values recalled from memory): V/V0 = (1 + ε∥)² (1 + ε⊥) for run 05 against run 01 → about +2.49 %.
    const ep = (e: number): number => (-2 * 63.9 * e) / 165.8;
    const v05 = ((1.01 ** 2 * (1 + ep(0.01))) / (0.99 ** 2 * (1 + ep(-0.01))) - 1) * 100;
    assert.ok(Math.abs(Number(strains[4]) - v05) < 0.01, `volume strain of run 05: ${strains[4]} %, expected ${v05.toFixed(3)} %`);
    const cautions = await v.page.locator('.cv-cautions li').allInnerTexts();
    assert.ok(
      cautions.some((c) => /semilocal DFT/i.test(c)),
      'the semilocal-gap caution is shown',
    );
    assert.ok(
      cautions.some((c) => /functional.*spin–orbit.*strain/i.test(c)),
      'the mass caution is shown',
    );
    // The conduction minimum moves between Δ valleys across the series (common practice: biaxial strain
    // splits the six Δ valleys into 2 + 4, lowest pair depending on the sign of the strain).
    const events = await v.page.locator('.cv-events li').allInnerTexts();
    assert.ok(
      events.some((e) => /conduction band minimum moved/.test(e)),
      events.join('\n'),
    );
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-table.png'), fullPage: true });
    await clean(v);
    await v.page.close();
  });

  it('sorting by a mass column reorders the rows, both ways', async () => {
    const key = table.columns.find((c) => c.key.startsWith('cbm.m.'))!.key;
    const values = NAMES.map((n, i) => ({ name: `si-strain/${n}/EIGENVAL`, m: table.rows[i]!.values[key]! }));
    assert.ok(
      values.every((x) => typeof x.m === 'number'),
      'every run has a CBM mass in this column',
    );
    const ascending = [...values].sort((a, b) => a.m - b.m).map((x) => x.name);
    assert.notDeepEqual(
      ascending,
      values.map((x) => x.name),
      'the mass order differs from the name order (else the test could not fail)',
    );
    const v = await openView(h, table);
    await showMoreColumns(v);
    const header = v.page.locator(`table.cv-table th[data-key="${key}"] button`);
    await header.click();
    const names = (): Promise<string[]> =>
      v.page.evaluate(() =>
        (window as unknown as { valleyscopeCompareView: { visibleRowNames(): string[] } }).valleyscopeCompareView.visibleRowNames(),
      );
    assert.deepEqual(await names(), ascending);
    assert.equal(await v.page.locator(`table.cv-table th[data-key="${key}"]`).getAttribute('aria-sort'), 'ascending');
    // Keyboard: the header button has focus after the click; Enter sorts the other way.
    await v.page.keyboard.press('Enter');
    assert.deepEqual(await names(), [...ascending].reverse());
    const cells = (await v.page.locator(`table.cv-table tbody td[data-key="${key}"]`).allInnerTexts()).map((t) =>
      Number(t.replace('−', '-')),
    );
    for (let i = 1; i < cells.length; i++) assert.ok(cells[i - 1]! >= cells[i]!, `descending cells: ${cells.join(', ')}`);
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-sorted.png'), fullPage: true });
    await clean(v);
    await v.page.close();
  });

  it('overlays two ticked runs on one path, both drawn on the canvas and aligned at the VBM', async () => {
    const v = await openView(h, table);
    await v.page.locator('table.cv-table tbody tr[data-id="r0"] input.cv-select').check();
    await answerBands(v, runs, 1);
    await v.page.locator('table.cv-table tbody tr[data-id="r4"] input.cv-select').check();
    await answerBands(v, runs, 2);
    await waitForExpression(
      v.page,
      'window.valleyscopeCompareView.lastOverlay && window.valleyscopeCompareView.lastOverlay.runs.length === 2',
    );
    const stats = (await v.page.evaluate('window.valleyscopeCompareView.lastOverlay')) as {
      runs: string[];
      shared: boolean;
      strokes: number[];
    };
    assert.deepEqual(stats.runs, ['r0', 'r4']);
    assert.equal(stats.shared, true, 'the series shares its path (Z–Γ–X–W–K–Γ–L in every KPOINTS)');
    // First run in --vscode-charts-blue, second in --vscode-charts-orange (the view's order of colours).
    const blue = hexToRgb(THEME_VARS.dark['--vscode-charts-blue']!);
    const orange = hexToRgb(THEME_VARS.dark['--vscode-charts-orange']!);
    const nBlue = await countColour(v, blue, 30);
    const nOrange = await countColour(v, orange, 30);
    assert.ok(nBlue > 300, `the first run is drawn (${nBlue} blue pixels)`);
    assert.ok(nOrange > 150, `the second run is drawn (${nOrange} orange pixels)`);
    // Aligned at the VBM: both runs have ink on the row of E − E_VBM = 0 (the window is −6…5 eV), although
    // their raw VBM energies differ (raw model energies near 10.5 eV would be far outside the window).
    const ph = (await v.page.evaluate(`document.querySelector('canvas.cv-overlay-canvas').height`)) as number;
    const y0 = Math.round((ph * 5) / 11);
    assert.ok((await countColour(v, blue, 30, [y0 - 2, y0 + 2])) > 0, 'first run touches E = 0');
    assert.ok((await countColour(v, orange, 30, [y0 - 3, y0 + 3])) > 0, 'second run touches E = 0');
    const legend = await v.page.locator('.cv-legend-item').allInnerTexts();
    assert.deepEqual(
      legend.map((t) => t.trim()),
      ['si-strain/01_biaxial-1.00pct/EIGENVAL', 'si-strain/05_biaxial+1.00pct/EIGENVAL'],
    );
    const labels = await v.page.locator('.cv-axis-x text').evaluateAll((els) => els.map((e) => e.textContent));
    assert.deepEqual(labels, ['Z', 'Γ', 'X', 'W', 'K', 'Γ', 'L'], 'the path labels as written in the series KPOINTS');
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-overlay.png'), fullPage: true });
    // Unticking removes a run from the plot.
    await v.page.locator('table.cv-table tbody tr[data-id="r4"] input.cv-select').uncheck();
    await waitForExpression(v.page, 'window.valleyscopeCompareView.lastOverlay.runs.length === 1');
    assert.equal(await countColour(v, orange, 30), 0, 'no orange left after unticking the second run');
    // Runs differ by more than colour: the second run's line pattern (7 px drawn, 4 px left out) inks about
    // 7/11 of what the same run inks drawn solid as the only run (hand computation; butt caps).
    await v.page.locator('table.cv-table tbody tr[data-id="r0"] input.cv-select').uncheck();
    await v.page.locator('table.cv-table tbody tr[data-id="r4"] input.cv-select').check();
    await waitForExpression(
      v.page,
      "window.valleyscopeCompareView.lastOverlay.runs.length === 1 && window.valleyscopeCompareView.lastOverlay.runs[0] === 'r4'",
    );
    const solid = await countColour(v, blue, 30);
    assert.ok(nOrange / solid > 0.45 && nOrange / solid < 0.85, `dashed ${nOrange} px against solid ${solid} px`);
    await clean(v);
    await v.page.close();
  });

  it('draws runs with different paths side by side', async () => {
    const withBulk = buildCompareTable([entryOf(runs.get('r2')!, 'r2'), entryOf(runs.get('r5')!, 'r5')], null, false);
    const v = await openView(h, withBulk);
    await v.page.locator('table.cv-table tbody tr[data-id="r2"] input.cv-select').check();
    await answerBands(v, runs, 1);
    await v.page.locator('table.cv-table tbody tr[data-id="r5"] input.cv-select').check();
    await answerBands(v, runs, 2);
    await waitForExpression(
      v.page,
      'window.valleyscopeCompareView.lastOverlay && window.valleyscopeCompareView.lastOverlay.runs.length === 2',
    );
    const stats = (await v.page.evaluate('window.valleyscopeCompareView.lastOverlay')) as { shared: boolean };
    assert.equal(stats.shared, false, 'Z–Γ–X–W–K–Γ–L and the bulk fcc path differ');
    assert.equal(await v.page.locator('line.cv-separator').count(), 1, 'one separator between the two runs');
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-side-by-side.png'), fullPage: true });
    await clean(v);
    await v.page.close();
  });

  it('trend plot: one point per run; clicking a point opens that run', async () => {
    const v = await openView(h, table);
    await v.page.evaluate(`window.valleyscopeCompareView.setTrend('volumeStrain', 'gap')`);
    const n = await v.page.locator('svg.cv-trend-svg circle.cv-point').count();
    assert.equal(n, NAMES.length, 'one point per run');
    const pts = (await v.page.evaluate('window.valleyscopeCompareView.lastTrendPoints')) as { rowId: string; x: number; y: number }[];
    // Each point's y is the gap the core found for that run.
    for (const p of pts) assert.ok(Math.abs(p.y - runs.get(p.rowId)!.report.gap!.eV) < 1e-12, `point ${p.rowId}`);
    // Volume grows with in-plane strain here (ε⊥ = −0.77 ε∥ keeps (1+ε∥)²(1+ε⊥) increasing: demo README values).
    assert.deepEqual(
      pts.map((p) => p.rowId),
      ['r0', 'r1', 'r2', 'r3', 'r4'],
    );
    const last = v.page.locator('svg.cv-trend-svg circle.cv-point[data-row="r4"]');
    await last.click();
    await waitForExpression(v.page, `window.__posted.some(function (m) { return m.type === 'compareOpenRun' && m.rowId === 'r4'; })`);
    const open = (await posted(v)).filter((m) => m.type === 'compareOpenRun').pop()!;
    assert.equal(open.target, 'bandView');
    // Keyboard: focus a point and press Enter.
    await v.page.locator('svg.cv-trend-svg circle.cv-point[data-row="r1"]').focus();
    await v.page.keyboard.press('Enter');
    await waitForExpression(v.page, `window.__posted.some(function (m) { return m.type === 'compareOpenRun' && m.rowId === 'r1'; })`);
    // A typed value per run as the x axis: only runs with a value are plotted.
    await v.page.locator('table.cv-table tbody tr[data-id="r0"] input.cv-user').fill('1.5');
    await v.page.locator('table.cv-table tbody tr[data-id="r0"] input.cv-user').press('Enter');
    await v.page.locator('table.cv-table tbody tr[data-id="r3"] input.cv-user').fill('-2');
    await v.page.locator('table.cv-table tbody tr[data-id="r3"] input.cv-user').press('Tab');
    await v.page.evaluate(`window.valleyscopeCompareView.setTrend('user', 'gap')`);
    assert.equal(await v.page.locator('svg.cv-trend-svg circle.cv-point').count(), 2);
    await v.page.evaluate(`window.valleyscopeCompareView.setTrend('volumeStrain', 'gap')`);
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-trend.png'), fullPage: true });
    await clean(v);
    await v.page.close();
  });

  it('flags stale annotations and marks rows that show saved numbers', async () => {
    const a = entryOf(runs.get('r0')!, 'r0');
    const stale: CompareEntry = {
      ...entryOf(runs.get('r1')!, 'r1'),
      annotations: 'stale',
      staleReasons: ['source EIGENVAL (eigenvalues) has changed since the annotations were written'],
    };
    const saved: CompareEntry = {
      ...entryOf(runs.get('r2')!, 'r2'),
      name: 'si-strain/03_biaxial+0.00pct/EIGENVAL.valleys.json',
      origin: 'annotations',
      annotations: 'current',
      canOverlay: false,
    };
    const broken: CompareEntry = { ...entryOf(runs.get('r3')!, 'r3'), run: null, error: 'EIGENVAL line 9: a number was expected' };
    const v = await openView(h, buildCompareTable([a, stale, saved, broken], null, true));
    const flag = v.page.locator('tr[data-id="r1"] .cv-stale');
    assert.equal(await flag.innerText(), 'stale');
    assert.match((await flag.getAttribute('title')) ?? '', /has changed since/);
    assert.equal(await v.page.locator('tr[data-id="r2"] .cv-tag', { hasText: 'saved numbers' }).count(), 1);
    assert.equal(await v.page.locator('tr[data-id="r2"] input.cv-select').isDisabled(), true, 'nothing to draw without a data file');
    assert.equal(await v.page.locator('tr[data-id="r3"] td[data-key="gap"]').innerText(), '—', 'an unreadable run has no numbers');
    assert.ok(
      (await v.page.locator('.cv-cautions li').allInnerTexts()).some((c) =>
        /annotations files show the numbers as they were saved/i.test(c),
      ),
    );
    assert.match((await v.page.locator('.cv-summary').innerText()) ?? '', /4 runs, 1 unreadable, 1 with stale annotations/);
    await clean(v);
    await v.page.close();
  });

  it('mixed materials: the default reference is a run of the material most runs share; trend lines stay within one material', async () => {
    // GaAs bulk listed first (as an alphabetical search finds it), then silicon: bulk and the strain series.
    const gaas = await readRun(join('fixtures', 'demo', 'gaas-bulk'), 'gaas-bulk/EIGENVAL');
    const list: CompareEntry[] = [
      entryOf(gaas, 'g0'),
      entryOf(runs.get('r5')!, 'r5'),
      ...NAMES.map((_, i) => entryOf(runs.get(`r${i}`)!, `r${i}`)),
    ];
    const t = buildCompareTable(list, null, false);
    // Six of seven runs are silicon (demo README): the reference is the first silicon run, not GaAs.
    assert.equal(t.reference, 'r5');
    assert.equal(t.rows.find((r) => r.id === 'g0')!.series, 'As1 Ga1');
    assert.equal(t.rows.find((r) => r.id === 'g0')!.latticeType, 'cF'); // zincblende: face-centred cubic (common practice)
    // The chosen reference still wins over the default.
    assert.equal(buildCompareTable(list, 'g0', false).reference, 'g0');
    const v = await openView(h, t);
    assert.equal(await v.page.evaluate(`document.querySelector('vscode-single-select.cv-reference').value`), 'r5');
    const events = await v.page.locator('.cv-events h2').innerText();
    assert.match(events, /against si-bulk\/EIGENVAL/);
    // GaAs is not compared valley by valley with silicon: one sentence says it is another material.
    const gaasEvents = t.events.filter((e) => e.rowId === 'g0');
    assert.deepEqual(
      gaasEvents.map((e) => e.kind),
      ['other-material'],
    );
    assert.match(gaasEvents[0]!.message, /another material \(As1 Ga1\) than the reference \(Si2\)/);
    assert.ok(
      t.events.some((e) => e.rowId !== 'g0' && e.kind !== 'other-material'),
      'control: silicon runs keep their valley events',
    );
    assert.match(
      (await v.page.locator('tr[data-id="g0"] td', { hasText: '[' }).first().getAttribute('title')) ?? '',
      /Another material \(As1 Ga1\)/,
    );
    assert.equal(await v.page.locator('tr[data-id="g0"] td.cv-moved').count(), 0, 'no "edge moved" mark against another material');
    // Trend of the gap against the volume: silicon (bulk and the strain series, cubic and tetragonal) is one
    // line; GaAs is a series of its own.
    await v.page.evaluate(`window.valleyscopeCompareView.setTrend('volume', 'gap')`);
    const series = (await v.page.evaluate('window.valleyscopeCompareView.lastTrendSeries')) as { name: string; rowIds: string[] }[];
    assert.ok(series.length >= 2, JSON.stringify(series));
    for (const sr of series) {
      const names = new Set(sr.rowIds.map((id) => t.rows.find((r) => r.id === id)!.series));
      assert.equal(names.size, 1, `one material per line: ${sr.name}`);
    }
    const lines = await v.page
      .locator('svg.cv-trend-svg path.cv-trend-line')
      .evaluateAll((ps) => ps.map((p) => p.getAttribute('data-series')));
    assert.deepEqual(lines, ['Si2'], 'one line: silicon; the single GaAs run joins no line');
    assert.deepEqual(series.find((x) => x.name === 'Si2')!.rowIds.length, 6);
    const legend = (await v.page.locator('.cv-trend-legend').innerText()) ?? '';
    assert.match(legend, /As1 Ga1 \(cF\): 1 run/);
    assert.match(legend, /Si2 \(cF, tI\): 6 runs|Si2 \(tI, cF\): 6 runs/);
    await v.page.screenshot({ path: join(ARTIFACTS, 'compare-view-materials.png'), fullPage: true });
    await clean(v);
    await v.page.close();
  });

  it('conventional lattice constants for cubic cells, labelled so; cell-vector lengths only behind More columns', async () => {
    const bulk = runs.get('r5')!;
    const t = buildCompareTable([entryOf(bulk, 'r5'), ...NAMES.map((_, i) => entryOf(runs.get(`r${i}`)!, `r${i}`))], null, false);
    const row = t.rows.find((r) => r.id === 'r5')!;
    // Silicon: a = 5.431 Å (handbook value, memory); the demo writes 5.43 Å (demo README). The fcc primitive
    // vectors are a/√2 long (common practice), so the conventional a is √2 × |a₁|.
    assert.ok(Math.abs(row.values.aConv! - 5.43) < 1e-6, `conventional a ${row.values.aConv}`);
    assert.ok(Math.abs(row.values.aConv! - Math.SQRT2 * row.values.a!) < 1e-9);
    assert.ok(row.values.a! < 4, 'the cell vector is the primitive one (3.84 Å), which is why it is not shown as "a"');
    // Valleys are named by their place on the labelled path, as the CLI names them: the Si CBM lies on Γ–X
    // (the Δ line, common practice), so "0.85 Γ→X"-style, not a bare fractional k.
    assert.match(row.cbm ?? '', /^0\.\d+ (Γ→X|X→Γ)$/, `CBM at ${row.cbm}`);
    // A biaxially strained film is tetragonal: no cubic constant for it.
    const strained = t.rows.find((r) => r.id === 'r0')!;
    assert.equal(strained.values.aConv ?? null, null);
    const v = await openView(h, t);
    const headerText = await v.page.locator('table.cv-table thead').innerText();
    assert.match(headerText, /conventional a/);
    assert.equal(await v.page.locator('table.cv-table th[data-key="a"]').count(), 0, 'cell-vector lengths hidden in the compact set');
    // Compact default set: gap, edges, N_v, DOS and conductivity masses (and conventional a).
    const keys = await v.page
      .locator('table.cv-table thead th[data-key]')
      .evaluateAll((ths) => ths.map((th) => (th as HTMLElement).dataset.key));
    const numeric = keys.filter((k) => !['name', 'annotations', 'type', 'vbm', 'cbm', 'user'].includes(k!));
    for (const k of numeric)
      assert.ok(
        ['gap', 'deltaGap', 'cbm.nv', 'cbm.dos', 'cbm.cond', 'vbm.nv', 'vbm.dos', 'vbm.cond', 'aConv'].includes(k!),
        `compact column ${k}`,
      );
    assert.ok(t.columns.length > numeric.length + 5, `control: the full set is larger (${t.columns.length})`);
    assert.match((await v.page.locator('vscode-checkbox.cv-more-columns').getAttribute('label')) ?? '', /More columns \(\d+ more\)/);
    await showMoreColumns(v);
    assert.equal(await v.page.locator('table.cv-table th[data-key="a"]').count(), 1);
    assert.match((await v.page.locator('table.cv-table th[data-key="a"]').innerText()) ?? '', /cell vector/);
    // Remembered across a reload of the view (webview state).
    assert.equal(await v.page.evaluate(`window.__state.more`), true);
    await clean(v);
    await v.page.close();
  });

  it('the compare messages are checked: unknown types, extra fields and bad ids are refused', () => {
    assert.ok(isCompareViewToHostMessage({ type: 'compareRequestBands', requestId: 3, rowIds: ['r0', 'r12'] }));
    assert.ok(!isCompareViewToHostMessage({ type: 'compareRequestBands', requestId: 3, rowIds: ['../x'] }));
    assert.ok(
      !isCompareViewToHostMessage({ type: 'compareRequestBands', requestId: 3, rowIds: Array.from({ length: 9 }, (_, i) => `r${i}`) }),
      'at most 8 runs',
    );
    assert.ok(!isCompareViewToHostMessage({ type: 'compareOpenRun', rowId: 'r1', target: 'terminal' }));
    assert.ok(!isCompareViewToHostMessage({ type: 'compareReady', extra: 1 }));
    assert.ok(!isCompareViewToHostMessage({ type: 'ready' }), 'a band-view message is not a compare message');
    assert.ok(!isViewToHostMessage({ type: 'compareReady' }), 'and the other way round');
  });
});
