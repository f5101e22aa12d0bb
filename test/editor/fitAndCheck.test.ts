/**
 * Scenarios in a real VS Code (code-server) with the packaged extension: a save from the band view passes
 * `valleyscope check`, and a secondary valley is fitted (by keyboard and by click) exactly where it was
 * selected. Data: Si and GaAs from the empirical pseudopotential model of Cohen & Bergstresser, Phys. Rev. 141,
 * 789 (1966), on the standard fcc path (Setyawan & Curtarolo 2010), in VASP's layout (fixtures/epm). L and X
 * are the fcc zone's points (1/2, 1/2, 1/2) and (1/2, 0, 1/2) in reciprocal coordinates (common practice).
 * The reference for "clean" is the command-line twin itself (`check` exit code 0).
 */
import assert from 'node:assert/strict';
import { existsSync, readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import type { FrameLocator } from 'playwright-core';
import { SharedSession } from './support/sharedSession';
import { type EditorSession, waitFor } from './support/editorSession';
import { massRows, waitForBandView } from './support/bandViewDriver';
import { cliAnalyze } from './support/reference';

const repo = (...p: string[]): string => join(__dirname, '..', '..', ...p);

const shared = new SharedSession({
  name: 'fitcheck',
  workspace: [
    [repo('fixtures', 'epm', 'si'), 'si-check'],
    [repo('fixtures', 'epm', 'gaas'), 'gaas-keys'],
    [repo('fixtures', 'epm', 'gaas'), 'gaas-click'],
  ],
});
const session = (): Promise<EditorSession> => shared.get();

/** The view's status line (what the keyboard selected, what was fitted, saved). */
async function statusText(view: FrameLocator): Promise<string> {
  return (await view.locator('.vs-status').innerText()).trim();
}

/** Press `key` on the focused plot until the status line matches `want` (at most `max` presses). */
async function selectByKeys(view: FrameLocator, s: EditorSession, key: string, want: RegExp, max = 60): Promise<string> {
  await view.locator('.vs-plot').focus();
  for (let i = 0; i < max; i++) {
    await s.page.keyboard.press(key);
    const t = await statusText(view);
    if (want.test(t)) return t;
  }
  throw new Error(`no selection matching ${want} after ${max} presses of ${key}; status: ${await statusText(view)}`);
}

/** The fitted extremum's line under the heading: "band 5 · k = (0.5, 0.5, 0.5) (L) · E − … eV". */
async function fitWhere(view: FrameLocator): Promise<string> {
  return (await view.locator('.vs-fit-head .vs-fit-where').innerText()).trim();
}

async function waitForFit(view: FrameLocator, kind: RegExp, where: RegExp): Promise<void> {
  await waitFor(
    async () => {
      const head = await view
        .locator('.vs-fit-head .vs-fit-kind')
        .innerText()
        .catch(() => '');
      const w = await view
        .locator('.vs-fit-head .vs-fit-where')
        .innerText()
        .catch(() => '');
      return kind.test(head) && where.test(w) ? true : undefined;
    },
    `no fit of ${kind} at ${where}`,
    60_000,
  );
}

describe('in a real VS Code: saved fits pass check; secondary valleys are fitted where selected', function () {
  this.timeout(300_000);

  shared.hooks({ closeEditors: true });

  it('fit the L valley and the CBM, save, and `valleyscope check` on the run exits 0', async () => {
    const s = await session();
    const run = s.path('si-check');
    const target = join(run, 'EIGENVAL.valleys.json');
    await s.openFile('si-check/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-check/EIGENVAL');
    // The CBM: the first selection of the Right key, fitted with Enter.
    await selectByKeys(view, s, 'ArrowRight', /Conduction-band minimum/);
    await s.page.keyboard.press('Enter');
    await waitForFit(view, /CBM/, /band 5/);
    // The L point of the same band (not listed by the analysis in Si): further along with the Right key.
    await selectByKeys(view, s, 'ArrowRight', /k-point \d+ L\b.*band 5\b/);
    await s.page.keyboard.press('Enter');
    await waitForFit(view, /./, /k = \(0\.500, 0\.500, 0\.500\)/);
    await massRows(view);
    await view.locator('.vs-save').click();
    await waitFor(() => (existsSync(target) ? true : undefined), `${target} was not written`, 30_000);
    await waitFor(async () => (/Saved/.test(await statusText(view)) ? true : undefined), 'no "Saved" message', 30_000);
    await s.screenshot('saved-then-check');
    const file = JSON.parse(readFileSync(target, 'utf8')) as {
      entries: { kind: string; k: number[]; fit?: { window_meV: number; method: string } }[];
    };
    assert.equal(file.entries.filter((e) => e.fit).length, 2, 'both fits recorded with their window and method');
    const check = spawnSync(process.execPath, [join(s.env.repoRoot, 'dist', 'cli.js'), 'check', run], { encoding: 'utf8' });
    assert.equal(check.status, 0, `check exited ${check.status}:\n${check.stdout}\n${check.stderr}`);
    assert.match(check.stdout, /^ok /m);
  });

  it('GaAs: the secondary valley on the X side is fitted there, selected by keyboard (Enter)', async () => {
    const s = await session();
    await s.openFile('gaas-keys/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'gaas-keys/EIGENVAL');
    // Reference: the analysis of the same file by the command-line twin lists the valley and its k.
    const cli = cliAnalyze(s.env.repoRoot, s.path('gaas-keys', 'EIGENVAL'));
    const xValley = cli.extrema.find((e) => e.kind === 'valley' && e.k[1] === 0 && e.k[0]! > 0.3 && Math.abs(e.k[0]! - e.k[2]!) < 1e-9);
    assert.ok(xValley, 'the CLI lists a conduction valley on Γ–X');
    const at = `(${xValley.k[0]!.toFixed(3)}, 0.000, ${xValley.k[2]!.toFixed(3)})`;
    // Right from nothing: the CBM, then the listed extrema in path order.
    await selectByKeys(view, s, 'ArrowRight', new RegExp(`Secondary conduction minimum.*k = ${at.replace(/[().]/g, '\\$&')}`));
    await s.page.keyboard.press('Enter');
    await waitForFit(view, /Secondary conduction minimum/, /band 5/);
    const where = await fitWhere(view);
    await s.screenshot('gaas-x-valley-keyboard');
    assert.ok(where.includes(`k = ${at}`), `fitted at ${where}; the CLI lists the valley at ${xValley.k}`);
    assert.doesNotMatch(await statusText(view), /Moved/);
  });

  it('GaAs: a click on the secondary valley marker on Γ–X fits that valley', async () => {
    const s = await session();
    await s.openFile('gaas-click/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'gaas-click/EIGENVAL');
    const cli = cliAnalyze(s.env.repoRoot, s.path('gaas-click', 'EIGENVAL'));
    const xValley = cli.extrema.find((e) => e.kind === 'valley' && e.k[1] === 0 && e.k[0]! > 0.3)!;
    assert.ok(xValley, 'the CLI lists a conduction valley on Γ–X');
    // Each marker group is placed at its extremum (transform="translate(x,y)" in the overlay's pixels).
    const groups = view.locator('svg.vs-overlay .vs-mark-group.vs-mark-valley');
    const n = await groups.count();
    assert.ok(n >= 1, 'secondary valley markers are drawn');
    let done = false;
    for (let i = 0; i < n && !done; i++) {
      const tr = (await groups.nth(i).getAttribute('transform')) ?? '';
      const m = /translate\(([-\d.e]+),\s*([-\d.e]+)\)/.exec(tr);
      if (!m) continue;
      await view.locator('svg.vs-overlay').click({ position: { x: Number(m[1]) + 1, y: Number(m[2]) + 1 } });
      // The fit of this marker's valley (another marker's fit may still be shown for a moment).
      const want = `k = (${xValley.k[0]!.toFixed(3)}, 0.000, ${xValley.k[2]!.toFixed(3)})`;
      done = await waitFor(
        async () => ((await fitWhere(view).catch(() => '')).includes(want) ? true : undefined),
        'not this marker',
        15_000,
      ).catch(() => false);
    }
    await s.screenshot('gaas-x-valley-click');
    assert.ok(done, `no marker click fitted the valley at ${xValley.k}; last: ${await fitWhere(view)}`);
    assert.doesNotMatch(await statusText(view), /Moved/);
  });
});
