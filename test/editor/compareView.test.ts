/**
 * The compare view in a real VS Code (code-server 4.100.3) with the packaged extension. Workspace: a copy of
 * the demo's strained-silicon series (fixtures/demo/si-strain: an invented scenario; bands of Cohen &
 * Bergstresser's empirical pseudopotential model, Phys. Rev. 141, 789 (1966), in VASP's layouts). Reference
 * numbers come from outside the editor: the command-line twin's `analyze --json` on each run's EIGENVAL.
 */
import assert from 'node:assert/strict';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { SharedSession } from './support/sharedSession';
import { type EditorSession, waitFor } from './support/editorSession';
import { cliAnalyze, type CliReport } from './support/reference';

const repo = (...p: string[]): string => join(__dirname, '..', '..', ...p);
const SERIES = repo('fixtures', 'demo', 'si-strain');
const RUNS = readdirSync(SERIES, { withFileTypes: true })
  .filter((d) => d.isDirectory())
  .map((d) => d.name)
  .sort();

const shared = new SharedSession({ name: 'compare', workspace: [[SERIES, 'si-strain']] });
const session = (): Promise<EditorSession> => shared.get();

const TAB = 'Valleyscope: Run Comparison';

describe('in a real VS Code, the compare view', function () {
  this.timeout(300_000);

  shared.hooks({ closeEditors: false, failedShot: 'failed-compare-view' });

  it('opens on the demo series, sorts by a mass and overlays two runs', async () => {
    assert.equal(RUNS.length, 5, `the demo series has five runs (${RUNS.join(', ')})`);
    const s = await session();
    await s.runCommand('Valleyscope: Compare Runs in Workspace');
    await s.page.locator('.tabs-container .tab', { hasText: TAB }).first().waitFor({ timeout: 60_000 });
    const view = s.webview();
    const rows = view.locator('table.cv-table tbody tr');
    await waitFor(
      async () => ((await rows.count()) === RUNS.length ? true : undefined),
      `the table did not list the ${RUNS.length} runs`,
      120_000,
    );
    const names = (): Promise<string[]> => rows.evaluateAll((trs) => trs.map((tr) => (tr as HTMLElement).dataset.name ?? ''));
    assert.deepEqual(
      await names(),
      RUNS.map((r) => `si-strain/${r}/EIGENVAL`),
    );

    // Reference: `valleyscope analyze --json` on each EIGENVAL of the workspace copy.
    const cli = new Map<string, CliReport>(
      RUNS.map((r) => [`si-strain/${r}/EIGENVAL`, cliAnalyze(s.env.repoRoot, s.path('si-strain', r, 'EIGENVAL'))]),
    );
    const gaps = await view.locator('table.cv-table tbody td[data-key="gap"]').allInnerTexts();
    RUNS.forEach((r, i) => {
      const g = cli.get(`si-strain/${r}/EIGENVAL`)!.gap!;
      assert.equal(gaps[i], g.eV.toFixed(4), `gap of ${r}: ${gaps[i]} shown, ${g.eV} from the CLI`);
    });
    await s.screenshot('compare-view-table');

    // Sort by the CBM mass towards Γ (along the Δ line: every run's CBM lies on Γ–X or Γ–Z here).
    const key = 'cbm.m.Γ';
    // Directional masses are behind "More columns" (the compact default set has the averaged masses).
    await view.locator('vscode-checkbox.cv-more-columns').click();
    const header = view.locator(`table.cv-table th[data-key="${key}"] button`);
    await header.waitFor({ timeout: 10_000 });
    assert.equal(await header.count(), 1, 'a column of CBM masses towards Γ');
    await header.click();
    const cbmMass = (name: string): number => {
      const r = cli.get(name)!;
      const cbm = r.extrema.find((e) => e.kind === 'cbm')!;
      const m = cbm.masses.find((x) => x.towards === 'Γ');
      assert.ok(m, `the CLI fits a CBM mass towards Γ for ${name}`);
      return m.mass;
    };
    const expected = [...cli.keys()].sort((a, b) => cbmMass(a) - cbmMass(b));
    assert.notDeepEqual(expected, [...cli.keys()], 'the mass order differs from the name order (else the check could not fail)');
    await waitFor(
      async () => ((await names()).join() === expected.join() ? true : undefined),
      `rows not in ascending order of the CBM mass: ${expected.join(', ')}`,
      15_000,
    );
    await s.screenshot('compare-view-sorted');

    // Overlay the most compressed and the most stretched run.
    const first = `si-strain/${RUNS[0]}/EIGENVAL`;
    const last = `si-strain/${RUNS[RUNS.length - 1]}/EIGENVAL`;
    await view.locator(`table.cv-table tbody tr[data-name="${first}"] input.cv-select`).check();
    await view.locator(`table.cv-table tbody tr[data-name="${last}"] input.cv-select`).check();
    const stats = await waitFor(
      async () => {
        const st =
          (await view.locator('body').evaluate(
            () =>
              (
                window as unknown as {
                  valleyscopeCompareView: {
                    lastOverlay: { runs: string[]; shared: boolean; strokes: number[]; colours: string[] } | null;
                  };
                }
              ).valleyscopeCompareView.lastOverlay,
          )) ?? null;
        return st && st.runs.length === 2 ? st : undefined;
      },
      'the two ticked runs were not drawn',
      60_000,
    );
    assert.equal(stats.shared, true, 'the series shares one path (Z–Γ–X–W–K–Γ–L)');
    // Both runs are on the canvas, each in its own colour.
    const inked = await view.locator('canvas.cv-overlay-canvas').evaluate((node, colours) => {
      const c = node as HTMLCanvasElement;
      const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
      const probe = document.createElement('canvas').getContext('2d')!;
      return colours.map((col) => {
        probe.fillStyle = col;
        const norm = String(probe.fillStyle);
        const rgb = norm.startsWith('#')
          ? [1, 3, 5].map((i) => parseInt(norm.slice(i, i + 2), 16))
          : (norm.match(/[\d.]+/g) ?? []).slice(0, 3).map(Number);
        let n = 0;
        for (let i = 0; i < d.length; i += 4)
          if (
            d[i + 3]! > 150 &&
            Math.abs(d[i]! - rgb[0]!) <= 30 &&
            Math.abs(d[i + 1]! - rgb[1]!) <= 30 &&
            Math.abs(d[i + 2]! - rgb[2]!) <= 30
          )
            n++;
        return n;
      });
    }, stats.colours);
    assert.ok(inked[0]! > 300, `the first run is drawn (${inked[0]} pixels of its colour)`);
    assert.ok(inked[1]! > 150, `the second run is drawn (${inked[1]} pixels of its colour)`);
    const legend = await view.locator('.cv-legend-item').allInnerTexts();
    assert.deepEqual(
      legend.map((t) => t.trim()),
      [first, last],
    );
    await s.screenshot('compare-view-overlay');
  });

  it('Open Band View on a folder of runs offers a picker of the runs found, and opens the one chosen', async () => {
    const s = await session();
    await s.closeAllEditors().catch(() => undefined);
    // The Explorer's context menu on the series folder (five runs below it).
    await s.runCommand('View: Show Explorer');
    const folderRow = s.page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'si-strain' }).first();
    await folderRow.waitFor({ timeout: 30_000 });
    await folderRow.click({ button: 'right' });
    const item = s.page.locator('.monaco-menu .action-item', { hasText: 'Open Band View' }).first();
    await item.waitFor({ timeout: 15_000 });
    await item.hover();
    await s.page.keyboard.press('Enter');
    // The picker (not the command palette used before): its title counts the runs found.
    await s.page.locator('.quick-input-widget', { hasText: `${RUNS.length} runs in si-strain` }).waitFor({ timeout: 60_000 });
    const picks = s.page.locator('.quick-input-widget .monaco-list-row', { hasText: '/EIGENVAL' });
    await waitFor(
      async () => ((await picks.count()) === RUNS.length ? true : undefined),
      `the picker did not list the ${RUNS.length} runs`,
      60_000,
    );
    const labels = await picks.allInnerTexts();
    await s.screenshot('folder-run-picker');
    // Each run is named by its folder, so the five EIGENVAL files can be told apart.
    for (const r of RUNS)
      assert.ok(
        labels.some((l) => l.includes(`${r}/EIGENVAL`)),
        `a row for ${r}: ${labels.join(' | ')}`,
      );
    const chosen = RUNS[2]!;
    await s.page
      .locator('.quick-input-widget .monaco-list-row', { hasText: `${chosen}/EIGENVAL` })
      .first()
      .click();
    await s.page
      .locator('.tabs-container .tab', { hasText: `Bands: ${chosen}/EIGENVAL` })
      .first()
      .waitFor({ timeout: 60_000 });
    const view = s.webview();
    await view.locator('svg.vs-overlay .vs-mark-group').first().waitFor({ state: 'attached', timeout: 60_000 });
    // The header names the run and the layout it was read as.
    assert.match(await view.locator('.vs-title').first().innerText(), new RegExp(`${chosen.replace(/[+.]/g, '\\$&')}/EIGENVAL \\(VASP`));
    await s.screenshot('folder-run-opened');
  });

  it('the analysis summary opens read-only: closing it asks nothing', async () => {
    const s = await session();
    await s.openFile(`si-strain/${RUNS[0]}/EIGENVAL`);
    await s.runCommand('Valleyscope: Show Analysis Summary');
    const tab = s.page.locator('.tabs-container .tab', { hasText: '(summary)' }).first();
    await tab.waitFor({ timeout: 60_000 });
    await s.page.locator('.editor-instance .monaco-editor .view-lines', { hasText: 'gap' }).first().waitFor({ timeout: 30_000 });
    await s.screenshot('summary-document');
    assert.equal(
      await s.page.locator('.tabs-container .tab.dirty', { hasText: '(summary)' }).count(),
      0,
      'the summary is not an unsaved buffer',
    );
    await s.runCommand('View: Close Editor');
    await tab.waitFor({ state: 'detached', timeout: 15_000 });
    assert.equal(await s.page.locator('.monaco-dialog-box').count(), 0, 'no save prompt');
  });

  it('the reference run chosen in the compare view is remembered when the view is opened again', async () => {
    const s = await session();
    await s.closeAllEditors().catch(() => undefined);
    await s.runCommand('Valleyscope: Compare Runs in Workspace');
    const view = s.webview();
    const rows = view.locator('table.cv-table tbody tr');
    await waitFor(async () => ((await rows.count()) === RUNS.length ? true : undefined), 'the table did not list the runs', 120_000);
    const refRow = (): Promise<string | undefined> =>
      view
        .locator('table.cv-table tbody tr.cv-reference')
        .first()
        .evaluate((tr) => (tr as HTMLElement).dataset.name);
    const chosen = `si-strain/${RUNS[2]}/EIGENVAL`;
    assert.notEqual(await refRow(), chosen, 'the default reference is another run');
    // Choose the unstrained run as the reference through the select (what a user's pick dispatches).
    await view
      .locator('.cv-reference')
      .first()
      .evaluate((sel, name) => {
        const rows = Array.from(document.querySelectorAll('table.cv-table tbody tr')) as HTMLElement[];
        const id = rows.find((r) => r.dataset.name === name)?.dataset.id;
        (sel as HTMLSelectElement).value = id ?? '';
        sel.dispatchEvent(new Event('change'));
      }, chosen);
    await waitFor(async () => ((await refRow()) === chosen ? true : undefined), 'the chosen run did not become the reference', 30_000);
    // Close the view and open it again: the same reference.
    await s.closeAllEditors();
    await s.runCommand('Valleyscope: Compare Runs in Workspace');
    const again = s.webview().locator('table.cv-table tbody tr');
    await waitFor(async () => ((await again.count()) === RUNS.length ? true : undefined), 'the table did not list the runs again', 120_000);
    await waitFor(async () => ((await refRow()) === chosen ? true : undefined), 'the reference was not remembered', 30_000);
    await s.screenshot('compare-view-reference-remembered');
  });
});
