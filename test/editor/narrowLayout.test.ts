/**
 * The band view beside its file on a laptop-sized window (1280 × 800), in a real VS Code (code-server 4.100.3):
 * the boxes a user reads must not overlap or be cut off. Measured from the webview's DOM after a fit, with the
 * Explorer open as it usually is. Data: fixtures/epm/si (Cohen & Bergstresser's empirical pseudopotential
 * model, Phys. Rev. 141, 789 (1966), in VASP's layouts).
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { EditorSession } from './support/editorSession';
import { clickNearMark, massRows, waitForBandView } from './support/bandViewDriver';

const SI = join(__dirname, '..', '..', 'fixtures', 'epm', 'si');

interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

describe('in a real VS Code at 1280 × 800, the band view beside its file', function () {
  this.timeout(300_000);
  let session: EditorSession | undefined;

  after(async () => {
    await session?.close();
  });

  it('shows plot, masses and status lines without overlaps or clipping', async () => {
    session = await EditorSession.start({ name: 'narrow', workspace: [[SI, 'si-narrow']] });
    const s = session;
    await s.page.setViewportSize({ width: 1280, height: 800 });
    await s.runCommand('View: Show Explorer');
    await s.openFile('si-narrow/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-narrow/EIGENVAL');
    await clickNearMark(view, 'cbm', 2, 2);
    await massRows(view);
    await s.screenshot('band-view-1280x800');
    // A page-side script as text (the test's own transpiler would otherwise add helpers the page lacks).
    const measure = `(function () {
      function box(e) { if (!e) return null; var r = e.getBoundingClientRect(); return { x: r.left, y: r.top, w: r.width, h: r.height }; }
      function all(sel) { return Array.prototype.map.call(document.querySelectorAll(sel), box); }
      return {
        width: document.documentElement.clientWidth,
        plot: box(document.querySelector('.vs-plot')),
        side: box(document.querySelector('.vs-side')),
        readout: box(document.querySelector('.vs-readout')),
        status: box(document.querySelector('.vs-status')),
        masses: box(document.querySelector('table.vs-masses')),
        method: box(document.querySelector('.vs-method')),
        windowField: box(document.querySelector('.vs-window-field')),
        labels: all('.vs-axis-x text'),
        bar: all('.vs-bar > *').filter(function (b) { return b.w > 0; })
      };
    })()`;
    const m = (await view.locator('body').evaluate(measure)) as {
      width: number;
      plot: Box;
      side: Box;
      readout: Box;
      status: Box;
      masses: Box;
      method: Box | null;
      windowField: Box | null;
      labels: Box[];
      bar: Box[];
    };
    const overlap = (a: Box, b: Box): boolean =>
      a.x < b.x + b.w - 0.5 && b.x < a.x + a.w - 0.5 && a.y < b.y + b.h - 0.5 && b.y < a.y + a.h - 0.5;
    const inside = (a: Box, what: string): void =>
      assert.ok(
        a.x >= -0.5 && a.x + a.w <= m.width + 0.5,
        `${what} is cut off (${a.x.toFixed(0)}–${(a.x + a.w).toFixed(0)} of ${m.width} px)`,
      );
    // The view's width beside the file: narrow enough that the side panel goes below the plot (styles.ts).
    assert.ok(m.width < 900, `the band view is ${m.width} px wide beside the file`);
    assert.ok(m.plot.w > 300 && m.plot.h > 150, `the plot keeps a usable size (${m.plot.w.toFixed(0)} × ${m.plot.h.toFixed(0)} px)`);
    assert.ok(!overlap(m.plot, m.side), 'plot and side panel do not overlap');
    assert.ok(!overlap(m.readout, m.status), 'the readout and the status line do not overlap');
    inside(m.masses, 'the mass table');
    if (m.method) inside(m.method, 'the method list');
    if (m.windowField) inside(m.windowField, 'the window field');
    for (let i = 1; i < m.labels.length; i++) assert.ok(!overlap(m.labels[i - 1]!, m.labels[i]!), `k labels ${i - 1} and ${i} overlap`);
    for (let i = 0; i < m.bar.length; i++)
      for (let j = i + 1; j < m.bar.length; j++) assert.ok(!overlap(m.bar[i]!, m.bar[j]!), `toolbar items ${i} and ${j} overlap`);
  });
});
