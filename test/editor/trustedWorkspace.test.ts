/**
 * Scenarios in a real VS Code (code-server 4.100.3) with the packaged extension, in a trusted workspace.
 * Data: fixtures/epm/si, silicon from the empirical pseudopotential model of Cohen & Bergstresser,
 * Phys. Rev. 141, 789 (1966), on the standard fcc path (Setyawan & Curtarolo 2010), written in VASP's layouts;
 * each scenario gets its own copy of the run so none depends on another's files. Reference numbers come from
 * outside the editor: the command-line twin on the same file (`analyze --json`) and the KPOINTS file itself.
 */
import assert from 'node:assert/strict';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { SharedSession } from './support/sharedSession';
import { type EditorSession, waitFor } from './support/editorSession';
import { canvasInk, clickNearMark, fitKind, massRows, waitForBandView } from './support/bandViewDriver';
import { cliAnalyze, lineModeSegments, type CliExtremum } from './support/reference';
import { sliderAtWindow } from '../../webview/bandView/windowSlider';

const repo = (...p: string[]): string => join(__dirname, '..', '..', ...p);
const SI = repo('fixtures', 'epm', 'si');
const MALFORMED = join(__dirname, 'fixtures', 'malformed');

/** One editor for this file's scenarios, started by the first that needs it; a failed start fails each. */
const shared = new SharedSession({
  name: 'trusted',
  workspace: [
    [SI, 'si-outline'],
    [MALFORMED, 'malformed'],
    [SI, 'si-view'],
    [SI, 'si-save'],
    [SI, 'si-merge'],
    [SI, 'si-json'],
    [SI, 'si-reload'],
  ],
});
const session = (): Promise<EditorSession> => shared.get();

/** Energies in an annotations file have 4 decimals, masses 4 significant digits (the file's documented layout). */
const ENERGY_TOL = 0.5e-4 + 1e-9;
const massTol = (m: number): number => 0.5e-3 * Math.abs(m) + 1e-9;

const sameK = (a: readonly number[], b: readonly number[]): boolean => a.length === 3 && a.every((x, i) => Math.abs(x - b[i]!) < 2e-6);

interface FileMass {
  towards: string;
  mass: number | null;
  window_meV: number;
  method: string;
  branch?: number;
}
interface FileEntry {
  kind: string;
  band: number;
  spin: number;
  k: number[];
  energy_eV: number;
  masses: FileMass[];
  note?: string;
}
interface AnnotationsFile {
  gap: {
    eV: number;
    direct: boolean;
    vbm: { band: number; k: number[]; energy_eV: number };
    cbm: { band: number; k: number[]; energy_eV: number };
  } | null;
  entries: FileEntry[];
  [key: string]: unknown;
}

/** Checks that the numbers of an annotations file equal the CLI's on the same data file. */
function assertSameNumbers(file: AnnotationsFile, dataFile: string, repoRoot: string, windowArgs: string[] = []): void {
  const cli = cliAnalyze(repoRoot, dataFile, windowArgs);
  assert.ok(cli.gap && file.gap, 'both the CLI and the annotations file report a gap');
  // Reference: `valleyscope analyze --json` on the same file (issue 6's acceptance, issue 7's scenario).
  assert.ok(Math.abs(file.gap.eV - cli.gap.eV) <= ENERGY_TOL, `gap ${file.gap.eV} eV in the file, ${cli.gap.eV} eV from the CLI`);
  assert.equal(file.gap.direct, cli.gap.direct);
  assert.equal(file.gap.cbm.band, cli.gap.cbm.band);
  assert.ok(sameK(file.gap.cbm.k, cli.gap.cbm.k), `CBM k ${file.gap.cbm.k} vs ${cli.gap.cbm.k}`);
  assert.ok(Math.abs(file.gap.cbm.energy_eV - cli.gap.cbm.eV) <= ENERGY_TOL);
  assert.ok(Math.abs(file.gap.vbm.energy_eV - cli.gap.vbm.eV) <= ENERGY_TOL);
  const cliCbm = cli.extrema.find((e) => e.kind === 'cbm');
  assert.ok(cliCbm, 'the CLI reports a CBM');
  const entry = file.entries.find((e) => e.kind === 'cbm' && e.band === cliCbm.band && sameK(e.k, cliCbm.k));
  assert.ok(entry, `the annotations file has an entry for the CBM (band ${cliCbm.band} at ${cliCbm.k})`);
  assertSameMasses(entry, cliCbm);
}

function assertSameMasses(entry: FileEntry, cli: CliExtremum): void {
  assert.ok(Math.abs(entry.energy_eV - cli.eV) <= ENERGY_TOL, `energy ${entry.energy_eV} vs ${cli.eV}`);
  assert.ok(cli.masses.length > 0, 'the CLI fitted masses at this extremum');
  assert.equal(entry.masses.length, cli.masses.length, `${entry.masses.length} masses in the file, ${cli.masses.length} from the CLI`);
  for (const m of cli.masses) {
    const branch = (m as { branch?: number }).branch;
    const f = entry.masses.find((x) => x.towards === m.towards && (branch === undefined || x.branch === undefined || x.branch === branch));
    assert.ok(f, `a mass towards ${m.towards} in the file`);
    assert.ok(f.mass !== null, `the mass towards ${m.towards} is a number in the file`);
    assert.ok(Math.abs(f.mass - m.mass) <= massTol(m.mass), `mass towards ${m.towards}: ${f.mass} in the file, ${m.mass} from the CLI`);
    assert.equal(f.method, m.method);
    assert.ok(
      Math.abs(f.window_meV - m.window_meV) <= 0.01 * Math.max(1, m.window_meV),
      `window towards ${m.towards}: ${f.window_meV} vs ${m.window_meV}`,
    );
  }
}

describe('in a real VS Code, trusted workspace', function () {
  this.timeout(240_000);

  shared.hooks({ closeEditors: true });

  it('opening an eigenvalue file shows its outline with the labelled path segments', async () => {
    const s = await session();
    await s.openFile('si-outline/EIGENVAL');
    // Reference: the path as written in the run's KPOINTS (line mode: pairs of labelled end points).
    const expected = lineModeSegments(join(SI, 'KPOINTS'));
    assert.equal(expected.length, 10, 'the fixture path has 10 segments (Γ–X–W–K–Γ–L–U–W–L–K|U–X)');
    const labels = await s.outlineLabels(expected.length);
    await s.screenshot('outline');
    assert.deepEqual(labels, expected, `outline rows: ${JSON.stringify(labels)}`);
  });

  it('a malformed eigenvalue file shows a problem at the right line in the Problems panel', async () => {
    const s = await session();
    await s.openFile('malformed/EIGENVAL');
    // The fixture's band 5 of k-point 3 on line 41 reads "13.85x8595" (made that way: see test/editor/fixtures/README.md);
    // column 13 is where that token starts.
    const lines = readFileSync(join(MALFORMED, 'EIGENVAL'), 'utf8').split('\n');
    assert.equal(lines[40]!.trim().split(/\s+/)[1], '13.85x8595', 'the fixture still has its error on line 41');
    const rows = await s.problems(2);
    await s.screenshot('problems');
    const problem = rows.find((r) => /\[Ln \d+, Col \d+\]/.test(r) && r.includes('13.85x8595'));
    assert.ok(problem, `a problem row naming what was found ("13.85x8595"), with a position; rows: ${JSON.stringify(rows)}`);
    assert.match(problem, /\[Ln 41, Col 13\]/, `the problem points at line 41, column 13: ${problem}`);
  });

  it('the band view opens from the code lens and its band canvas is drawn', async () => {
    const s = await session();
    await s.openFile('si-view/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-view/EIGENVAL');
    const ink = await waitFor(
      async () => {
        const i = await canvasInk(view);
        return i.columnsInked > 0.9 ? i : undefined;
      },
      'the band canvas was not drawn across its width',
      60_000,
    );
    await s.screenshot('band-view');
    // Bands run along the whole path (every column of the plot has ink), several bands cross one column,
    // and the canvas has real size.
    assert.ok(ink.width > 200 && ink.height > 150, `canvas ${ink.width}×${ink.height} px`);
    assert.ok(ink.columnsInked > 0.9, `${(ink.columnsInked * 100).toFixed(0)} % of the columns are drawn`);
    assert.ok(ink.maxRunsInColumn >= 3, `at most ${ink.maxRunsInColumn} separate bands cross one column`);
    // The overlay marks both band edges of this semiconductor.
    assert.equal((await view.locator('svg.vs-overlay .vs-mark-cbm').count()) > 0, true, 'a CBM marker');
    assert.equal((await view.locator('svg.vs-overlay .vs-mark-vbm').count()) > 0, true, 'a VBM marker');
  });

  it('a click near the conduction minimum shows its masses, equal to the CLI', async () => {
    const s = await session();
    await s.openFile('si-view/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-view/EIGENVAL');
    await clickNearMark(view, 'cbm', 3, 2);
    const rows = await massRows(view);
    await s.screenshot('cbm-fit');
    assert.match(await fitKind(view), /CBM|conduction/i);
    // Reference: `valleyscope analyze --json` on the same file, same default window and method.
    const cli = cliAnalyze(s.env.repoRoot, s.path('si-view', 'EIGENVAL'));
    const cbm = cli.extrema.find((e) => e.kind === 'cbm');
    assert.ok(cbm && cbm.masses.length > 0, 'the CLI fits masses at the CBM');
    assert.equal(rows.length, cbm.masses.length, `rows: ${rows.map((r) => r.text).join(' | ')}`);
    for (const m of cbm.masses) {
      const row = rows.find((r) => r.towards === m.towards);
      assert.ok(row, `a row towards ${m.towards}`);
      // The panel shows 3 significant digits.
      assert.ok(
        Math.abs(row.mass - m.mass) <= 0.5e-2 * Math.abs(m.mass) + 1e-9,
        `towards ${m.towards}: ${row.mass} shown, ${m.mass} from the CLI`,
      );
    }
    // The fitted curve is drawn over the data.
    assert.ok((await view.locator('svg.vs-overlay path.vs-fit-curve').count()) > 0, 'a fitted curve is drawn');
  });

  it('save writes <file>.valleys.json whose numbers equal `analyze --json` on the same file', async () => {
    const s = await session();
    const data = s.path('si-save', 'EIGENVAL');
    const target = `${data}.valleys.json`;
    assert.equal(existsSync(target), false, 'no annotations file before the save');
    await s.openFile('si-save/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-save/EIGENVAL');
    await clickNearMark(view, 'cbm', -2, 3);
    await massRows(view);
    await view.locator('.vs-save').click();
    await waitFor(() => (existsSync(target) ? true : undefined), `${target} was not written`, 30_000);
    await s.screenshot('saved');
    const file = await waitFor(() => {
      try {
        return JSON.parse(readFileSync(target, 'utf8')) as AnnotationsFile;
      } catch {
        return undefined; // still being written
      }
    }, 'the annotations file is not valid JSON');
    assertSameNumbers(file, data, s.env.repoRoot);
  });

  it('a save from the band view merges into the open, edited, unsaved annotations file', async () => {
    const s = await session();
    const data = s.path('si-merge', 'EIGENVAL');
    const target = `${data}.valleys.json`;
    // 1. A first save, with no annotations file open: written to disk.
    await s.openFile('si-merge/EIGENVAL');
    await s.clickCodeLens('Open band view');
    let view = await waitForBandView(s, 'si-merge/EIGENVAL');
    await clickNearMark(view, 'cbm', 2, -2);
    await massRows(view);
    await view.locator('.vs-save').click();
    await waitFor(() => (existsSync(target) ? true : undefined), `${target} was not written by the first save`, 30_000);
    const first = readFileSync(target, 'utf8');
    const firstDoc = JSON.parse(first) as AnnotationsFile;
    // 2. Open the annotations file and make a hand edit, not saved: a field of our own after the opening brace.
    await s.openFile('si-merge/EIGENVAL.valleys.json');
    await s.activeEditorText().click();
    await s.page.keyboard.press('Control+Home');
    await s.page.keyboard.press('End');
    await s.page.keyboard.press('Enter');
    await s.page.keyboard.type('"reviewedBy": "hand edit from the editor test",');
    const annotationsTab = s.page.locator('.tabs-container .tab', { hasText: 'EIGENVAL.valleys.json' }).first();
    await s.page.locator('.tabs-container .tab.dirty', { hasText: 'EIGENVAL.valleys.json' }).first().waitFor({ timeout: 10_000 });
    // 3. Back in the band view: a different fit window (40 meV), refit, save.
    await s.page.locator('.tabs-container .tab', { hasText: 'Bands: si-merge/EIGENVAL' }).first().click();
    view = await waitForBandView(s, 'si-merge/EIGENVAL');
    await clickNearMark(view, 'cbm', 2, -2);
    await massRows(view);
    const provenance25 = await view.locator('.vs-provenance').innerText();
    // The window slider (a range input: set its value and send the event a drag sends). It is logarithmic
    // (webview/bandView/windowSlider.ts): the position of 40 meV.
    await view.locator('#vs-window-range').evaluate((el, pos) => {
      (el as HTMLInputElement).value = String(pos);
      el.dispatchEvent(new Event('input', { bubbles: true }));
    }, sliderAtWindow(40));
    await waitFor(
      async () => ((await view.locator('.vs-provenance').innerText()) !== provenance25 ? true : undefined),
      'the refit at 40 meV did not show',
      30_000,
    );
    await view.locator('.vs-save').click();
    await waitFor(
      async () => ((await view.locator('.vs-status').innerText()).match(/Saved|Merged|Not saved/) ? true : undefined),
      'the band view did not report the save',
      30_000,
    );
    await s.screenshot('merge-after-view-save');
    // The host's sentence: "Saved N entries to …" (written) or "Merged N entries into the open editor …" (left in
    // the edited buffer for the user's save).
    assert.match(
      await view.locator('.vs-status').innerText(),
      /^(Saved|Merged) \d+ entr(y|ies)/,
      'the band view reports a successful save',
    );
    // The merge went through the open editor: either the merged buffer was saved by the extension (the
    // editor is clean again) or it waits in the editor for the user's save. Either way the hand edit must be
    // in what reaches the disk.
    const annotationsDirty = s.page.locator('.tabs-container .tab.dirty', { hasText: 'EIGENVAL.valleys.json' });
    if ((await annotationsDirty.count()) > 0) {
      assert.equal(readFileSync(target, 'utf8'), first, 'the file on disk is untouched while the merged buffer is unsaved');
      await annotationsTab.click();
      await s.activeEditorText().click();
      await s.page.keyboard.press('Control+S');
    }
    await waitFor(
      () => (readFileSync(target, 'utf8') !== first ? true : undefined),
      'the merged annotations never reached the disk',
      30_000,
    );
    await annotationsDirty.first().waitFor({ state: 'detached', timeout: 15_000 });
    await annotationsTab.click();
    // Show the hand edit in the screenshot (find it in the editor).
    await s.activeEditorText().click();
    await s.page.keyboard.press('Control+F');
    await s.page.keyboard.type('reviewedBy');
    await s.page.keyboard.press('Enter');
    await s.screenshot('merge-saved');
    await s.page.keyboard.press('Escape');
    const merged = JSON.parse(readFileSync(target, 'utf8')) as AnnotationsFile;
    assert.equal(merged.reviewedBy, 'hand edit from the editor test', 'the hand edit survived the merge');
    // The CBM entry now carries the 40 meV fit, equal to the CLI with --window 40.
    const cbm = merged.entries.find((e) => e.kind === 'cbm');
    assert.ok(cbm, 'a CBM entry after the merge');
    assert.ok(
      cbm.masses.some((m) => Math.abs(m.window_meV - 40) < 1e-6 || m.window_meV > 40),
      'the merged CBM masses come from the 40 meV fit',
    );
    const cli = cliAnalyze(s.env.repoRoot, data, ['--window', '40']).extrema.find((e) => e.kind === 'cbm');
    assert.ok(cli);
    assertSameMasses(cbm, cli);
    assert.notDeepEqual(
      cbm.masses.map((m) => m.window_meV),
      firstDoc.entries.find((e) => e.kind === 'cbm')?.masses.map((m) => m.window_meV),
      'the merge changed the CBM fit (25 → 40 meV)',
    );
    assert.ok(statSync(target).size > 0);
  });

  it('an annotations file opens as JSON, not as an eigenvalue file', async () => {
    const s = await session();
    // An annotations file written by the command-line twin beside the data.
    execFileSync(process.execPath, [join(s.env.repoRoot, 'dist', 'cli.js'), 'annotate', s.path('si-json', 'EIGENVAL')], {
      timeout: 120_000,
    });
    assert.ok(existsSync(s.path('si-json', 'EIGENVAL.valleys.json')), 'valleyscope annotate wrote the file');
    await s.openFile('si-json/EIGENVAL.valleys.json');
    const mode = s.page.locator('.statusbar-item[id="status.editor.mode"]');
    const language = await waitFor(async () => {
      const t = (await mode.innerText().catch(() => '')).trim();
      return t ? t : undefined;
    }, 'no language shown in the status bar');
    await s.screenshot('annotations-file');
    // VS Code's language of "*.json" files is JSON (common practice of the editor); an eigenvalue reader
    // must not claim the file because its name starts with "EIGENVAL".
    assert.equal(language, 'JSON', `the annotations file opened as "${language}"`);
    // Watch the Problems panel for a few seconds: no reader problem may appear for this file.
    let wrong: string[] = [];
    const until = Date.now() + 6000;
    while (Date.now() < until && wrong.length === 0) {
      wrong = (await s.problems(0, 0)).filter((r) => /not an eigenvalue|could not be read|valleys\.json.*Valleyscope\(load\)/i.test(r));
      await new Promise((r) => setTimeout(r, 500));
    }
    assert.deepEqual(wrong, [], 'no reader problem reported for the annotations file');
  });

  it('after a window reload the band view comes back with the fit made before', async () => {
    const s = await session();
    await s.closeAllEditors().catch(() => undefined);
    await s.openFile('si-reload/EIGENVAL');
    await s.clickCodeLens('Open band view');
    let view = await waitForBandView(s, 'si-reload/EIGENVAL');
    await clickNearMark(view, 'cbm', 2, 2);
    const before = await massRows(view);
    await s.runCommand('Developer: Reload Window');
    // The workbench comes back; the band view's tab is restored by the extension (not reopened by the test).
    await s.page.locator('.monaco-workbench').waitFor({ timeout: 60_000 });
    view = await waitForBandView(s, 'si-reload/EIGENVAL', 120_000);
    const after = await massRows(view);
    await s.screenshot('band-view-after-reload');
    assert.deepEqual(
      after.map((r) => [r.towards, r.mass]),
      before.map((r) => [r.towards, r.mass]),
      'the same fit (directions and masses) is shown again',
    );
  });
});
