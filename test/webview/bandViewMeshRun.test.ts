/**
 * A mesh run in the band view: its interpolated bands along the standard path, with the run's own mesh points
 * on the path drawn as markers (data) over the interpolated lines. The run is the demo's mesh run
 * (fixtures/demo/tessellite-mesh: the simple-cubic tight-binding model of scripts/meshModel/axisValleyModel.ts,
 * lattice constant L, on a Γ-centred 12×12×12 mesh), made ready for the view by the extension's own
 * meshRunView.ts and meshPointsData.ts.
 */
import assert from 'node:assert/strict';
import { mkdirSync } from 'node:fs';
import { ARTIFACTS, startHarness, type Harness, type ViewPage } from './support/bandViewHarness';
import { bandDataMessage, loadMeshRunForView, type LoadedRun } from './support/coreBandData';
import { installPageHelpers, hexToRgb, waitForExpression } from './support/pageHelpers';
import { THEME_VARS } from './support/themes';
import { axisValleyBands } from '../../scripts/meshModel/axisValleyModel';
import { TESSELLITE } from '../../scripts/meshModel/demoMeshRun';
import type { BandStructure } from '../../src/core/model';
import { decodeArray, encodeArrayBase64, type EncodedArray } from '../../src/protocol';
import { MAX_MARKER_ELEMENTS } from '../../webview/bandView/meshPointOverlay';

type Marker = { band: number; x: number; y: number; title: string };

async function open(h: Harness, data: LoadedRun['data'], theme: 'dark' | 'hcLight' = 'dark'): Promise<ViewPage> {
  const v = await h.open(theme);
  await installPageHelpers(v.page);
  await v.hostPost(bandDataMessage(data));
  await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
  return v;
}

/** The drawn markers: band, centre in plot coordinates (from their rendered boxes), tooltip. */
async function markers(v: ViewPage): Promise<Marker[]> {
  return v.page.evaluate(`(function () {
    var plot = document.querySelector('.vs-plot').getBoundingClientRect();
    return Array.prototype.map.call(document.querySelectorAll('g.vs-mesh-points path.vs-mesh-point'), function (p) {
      var r = p.getBoundingClientRect();
      var t = p.querySelector('title');
      return { band: Number(p.getAttribute('data-band')), x: r.left + r.width / 2 - plot.left, y: r.top + r.height / 2 - plot.top,
        title: t ? t.textContent : '' };
    });
  })()`);
}

/** The 1-based number of the file's k-point equivalent to (x, 0, 0) under the cubic group: components sorted by size. */
function fileKpointOf(mesh: BandStructure, x: number): number {
  for (let i = 0; i < mesh.nk; i++) {
    const k = [0, 1, 2].map((c) => Math.abs(mesh.kpoints[3 * i + c]!)).sort((a, b) => a - b);
    if (Math.abs(k[0]!) < 1e-6 && Math.abs(k[1]!) < 1e-6 && Math.abs(k[2]! - Math.abs(x)) < 1e-6) return i + 1;
  }
  throw new Error(`no k-point (${x}, 0, 0) in the run`);
}

describe('band view: a mesh run drawn as interpolated bands with its mesh points', function () {
  this.timeout(120_000);
  let h: Harness;
  let run: LoadedRun & { mesh: BandStructure };
  before(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    h = await startHarness();
    run = await loadMeshRunForView('fixtures/demo/tessellite-mesh', 'tessellite mesh');
  });
  after(async () => {
    if (h) await h.close();
  });

  it('draws a marker at every sixth of Γ–X (12-mesh geometry) at the model energy, with its data in the tooltip', async () => {
    assert.ok(run.data.meshPoints && run.data.meshPoints.count > 0);
    const v = await open(h, run.data);
    const all = await markers(v);
    // Γ–X of the simple-cubic path runs from Γ (distance 0) to X = (0, ½, 0), |X| = π/L Å⁻¹ (Setyawan & Curtarolo
    // 2010, memory; common practice: path distance in Å⁻¹ with the 2π). On a Γ-centred 12-mesh the points of
    // that line are at j/12 of the reciprocal vector, j = 0…6: distances j π/(6L) (mesh geometry).
    const gx = Math.PI / TESSELLITE.L;
    const column = async (d: number): Promise<number> => (await v.page.evaluate(`window.valleyscopeBandView.scales.zx(${d})`)) as number;
    const row = async (e: number): Promise<number> => (await v.page.evaluate(`window.valleyscopeBandView.scales.zy(${e})`)) as number;
    const xEnd = await column(gx);
    const valence = all.filter((m) => m.band === 2 && m.x <= xEnd + 1).sort((a, b) => a.x - b.x);
    assert.equal(valence.length, 7, JSON.stringify(valence));
    const vbm = run.data.vbm_eV!;
    for (let j = 0; j <= 6; j++) {
      // The model's valence band at (j/12, 0, 0) (the same as at (0, j/12, 0) by the cubic symmetry of the model).
      const e = axisValleyBands(TESSELLITE, [j / 12, 0, 0])[1]!;
      const [x, y] = [await column((j * gx) / 6), await row(e - vbm)];
      assert.ok(Math.abs(valence[j]!.x - x) <= 1, `point ${j}: column ${valence[j]!.x} for ${x}`);
      assert.ok(Math.abs(valence[j]!.y - y) <= 1, `point ${j}: row ${valence[j]!.y} for ${y}`);
      assert.match(
        valence[j]!.title,
        new RegExp(`^Mesh point \\(data\\): band 2, k = .* \\(k-point ${fileKpointOf(run.mesh, j / 12)} of the file`),
      );
    }
    // The legend tells the markers (data) from the lines (interpolated).
    const legend = ((await v.page.evaluate(`__t.text('g.vs-mesh-legend text')`)) as string[]).join(' | ');
    assert.equal(legend, 'mesh point (data) | interpolated');
    assert.deepEqual(v.errors, []);
    assert.deepEqual(await v.cspViolations(), []);
    await v.page.screenshot({ path: `${ARTIFACTS}/bandview-mesh-points-dark.png` });
    await v.page.close();
  });

  it('says so to a screen reader: the plot names the mesh points; the read-out at a marker gives its data, elsewhere "interpolated"', async () => {
    const v = await open(h, run.data);
    const label = (await v.page.locator('.vs-plot').getAttribute('aria-label')) ?? '';
    assert.match(label, /\d+ points of the 12×12×12 mesh lie on this path: markers, mesh point \(data\); the lines are interpolated\./);
    // The caution beside the summary is the interpolation's (every number in this view inherits it), not the
    // demo's model-data caution that the report also carries.
    assert.match((await v.page.locator('.vs-caution-line').textContent()) ?? '', /^Caution: Interpolated from a 12×12×12 mesh/);
    const valence = (await markers(v)).filter((m) => m.band === 2).sort((a, b) => a.x - b.x);
    const third = valence[3]!; // (3/12, 0, 0) on Γ–X
    const q = (await v.page.evaluate(`__t.pagePoint(${third.x}, ${third.y})`)) as { x: number; y: number };
    await v.page.mouse.move(q.x, q.y);
    await waitForExpression(v.page, `document.querySelector('.vs-readout').textContent.indexOf('band 2') >= 0`);
    const text = (await v.page.locator('.vs-readout').textContent()) ?? '';
    const e = axisValleyBands(TESSELLITE, [3 / 12, 0, 0])[1]! - run.data.vbm_eV!; // the model (analytic), as written to 6 decimals
    assert.ok(
      text.includes(
        `interpolated; mesh point (data) here: k-point ${fileKpointOf(run.mesh, 0.25)} of the file, ${e.toFixed(4).replace('-', '−')} eV`,
      ),
      text,
    );
    // Half-way between two markers the read-out says the point is interpolated, and names no mesh point.
    const between = (await v.page.evaluate(
      `__t.pagePoint(${(valence[3]!.x + valence[4]!.x) / 2}, ${(valence[3]!.y + valence[4]!.y) / 2})`,
    )) as {
      x: number;
      y: number;
    };
    await v.page.mouse.move(between.x, between.y);
    await waitForExpression(v.page, `document.querySelector('.vs-readout').textContent.indexOf('mesh point') < 0`);
    assert.match((await v.page.locator('.vs-readout').textContent()) ?? '', / · interpolated$/);
    // By keyboard, the status line says the same of the selected extremum: the VBM at Γ is a mesh point (the first
    // point of a Γ-centred mesh file); the CBM of the model at x₀ ≈ 0.78 of Γ–X lies between mesh points (12 x₀/2
    // is not an integer; axisValleyTruth, analytic model).
    await v.page.focus('.vs-plot');
    await v.page.keyboard.press('ArrowDown');
    await waitForExpression(v.page, `document.querySelector('.vs-status').textContent.indexOf('Valence-band maximum') >= 0`);
    assert.match(
      (await v.page.locator('.vs-status').textContent()) ?? '',
      /interpolated; mesh point \(data\) here: k-point 1 of the file, 0\.0000 eV\. Enter fits it\.$/,
    );
    await v.page.keyboard.press('Escape');
    await v.page.keyboard.press('ArrowUp');
    await waitForExpression(v.page, `document.querySelector('.vs-status').textContent.indexOf('Conduction-band minimum') >= 0`);
    assert.match((await v.page.locator('.vs-status').textContent()) ?? '', / · interpolated\. Enter fits it\.$/);
    await v.page.close();
  });

  it('the markers take the theme: the editor text colour on the editor background (High Contrast Light)', async () => {
    const v = await open(h, run.data, 'hcLight');
    const style = (await v.page.evaluate(`(function () {
      var p = document.querySelector('g.vs-mesh-points path.vs-mesh-point'); var s = getComputedStyle(p);
      return { stroke: s.stroke, fill: s.fill, width: s.strokeWidth };
    })()`)) as { stroke: string; fill: string; width: string };
    const rgb = (hex: string): string => `rgb(${hexToRgb(hex).join(', ')})`;
    assert.equal(style.stroke, rgb(THEME_VARS.hcLight['--vscode-editor-foreground']!));
    assert.equal(style.fill, rgb(THEME_VARS.hcLight['--vscode-editor-background']!));
    assert.equal(style.width, '2px');
    await v.page.screenshot({ path: `${ARTIFACTS}/bandview-mesh-points-hc-light.png` });
    await v.page.close();
  });

  it('very many markers in view are drawn as one path per band (the redraw stays fast), each still titled', async () => {
    // The demo's points repeated 20 times: 760 points × the bands in view, more than MAX_MARKER_ELEMENTS.
    const m = run.data.meshPoints!;
    const times = 20;
    const repeat = (a: EncodedArray): EncodedArray => {
      const v = decodeArray(a);
      const out = new Float64Array(v.length * times);
      for (let r = 0; r < times; r++) out.set(v, r * v.length);
      return encodeArrayBase64(out);
    };
    const many = {
      ...m,
      count: m.count * times,
      distance: repeat(m.distance),
      kpoints: repeat(m.kpoints),
      fileKpoint: Array.from({ length: times }, () => m.fileKpoint).flat(),
      energies: m.energies.map(repeat),
    };
    const v = await open(h, { ...run.data, meshPoints: many });
    const drawn = Number(await v.page.locator('g.vs-mesh-points').getAttribute('data-count'));
    assert.ok(drawn > MAX_MARKER_ELEMENTS, String(drawn));
    const paths = v.page.locator('g.vs-mesh-points path.vs-mesh-point');
    assert.ok((await paths.count()) <= run.data.nBands, String(await paths.count()));
    assert.match((await paths.first().locator('title').textContent()) ?? '', /^mesh point \(data\), band \d+: \d+ points in view$/);
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });

  it('refuses mesh points that do not match the band data, saying why (checked like the rest of the data)', async () => {
    const m = run.data.meshPoints!;
    const v = await h.open('dark');
    await installPageHelpers(v.page);
    await v.hostPost(bandDataMessage({ ...run.data, meshPoints: { ...m, count: m.count + 1 } }));
    await waitForExpression(v.page, `document.querySelector('.vs-message') && !document.querySelector('.vs-message').hidden`);
    assert.match(
      (await v.page.locator('.vs-message').textContent()) ?? '',
      /could not show this data: mesh points: \d+ distances for \d+ points/,
    );
    await v.page.close();
  });
});
