/**
 * Restricted Mode: workspace trust enabled and the folder not trusted. The band view must open (reading is
 * safe) but read-only: saving is refused with an explanation and nothing is written to the workspace.
 * Data: fixtures/epm/si (silicon, Cohen & Bergstresser 1966 empirical pseudopotentials, VASP layouts).
 */
import assert from 'node:assert/strict';
import { readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { EditorSession, waitFor } from './support/editorSession';
import { canvasInk, clickNearMark, massRows, waitForBandView } from './support/bandViewDriver';

const SI = join(__dirname, '..', '..', 'fixtures', 'epm', 'si');

/** Every file under `dir` with its size and modification time, to see that nothing was written. */
function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string): void => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else {
        const st = statSync(p);
        out.set(relative(dir, p), `${st.size}:${st.mtimeMs}`);
      }
    }
  };
  walk(dir);
  return out;
}

describe('in a real VS Code, restricted (untrusted) workspace', function () {
  this.timeout(240_000);
  let session: EditorSession | undefined;

  after(async () => {
    await session?.close();
  });

  it('the band view opens read-only and saving writes nothing', async function () {
    session = await EditorSession.start({ name: 'restricted', trust: true, workspace: [[SI, 'si']] });
    const s = session;
    const page = s.page;
    try {
      // A fresh profile asks whether to trust the folder's authors: answer no.
      const dontTrust = page.locator('.monaco-dialog-box .monaco-button', { hasText: /No, I don't trust|Don't Trust/i }).first();
      await dontTrust.waitFor({ state: 'visible', timeout: 20_000 }).then(
        () => dontTrust.click(),
        () => undefined, // no prompt: the folder opens untrusted anyway, which the next line checks
      );
      // VS Code says it is in Restricted Mode (status bar item).
      await page.locator('.statusbar-item', { hasText: 'Restricted Mode' }).first().waitFor({ timeout: 30_000 });
      const before = snapshot(s.workspaceDir);

      await s.openFile('si/EIGENVAL');
      await s.clickCodeLens('Open band view');
      const view = await waitForBandView(s, 'si/EIGENVAL');
      // Reading works: the bands are drawn and a fit can be made.
      const ink = await waitFor(
        async () => {
          const i = await canvasInk(view);
          return i.columnsInked > 0.9 ? i : undefined;
        },
        'the band canvas was not drawn in Restricted Mode',
        60_000,
      );
      assert.ok(ink.maxRunsInColumn >= 3);
      await clickNearMark(view, 'cbm', 3, 2);
      await massRows(view);

      // Read-only: the view's save button is turned off with the explanation beside it; pressing it anyway
      // does nothing; the command from the palette is refused with the explanation as a notification.
      const reason = 'Saving is turned off in Restricted Mode';
      const saveButton = view.locator('.vs-save');
      const disabled = await saveButton.evaluate((el) => el.hasAttribute('disabled') || el.getAttribute('aria-disabled') === 'true');
      assert.equal(disabled, true, 'the save button is turned off');
      await waitFor(
        async () => ((await view.locator('body').innerText()).includes(reason) ? true : undefined),
        `the view does not say "${reason}"`,
        20_000,
      );
      await saveButton.click({ force: true });
      // (VS Code does not show a notification again while the same one is listed: clear them first.)
      await s.runCommand('Notifications: Clear All Notifications');
      await s.runCommand('Valleyscope: Save Annotations');
      const note = await waitFor(
        async () => (await s.notifications()).find((n) => n.includes(reason)),
        `no notification saying "${reason}" after the command`,
        20_000,
      );
      assert.match(note, /trust/i, 'the notification says how to allow saving');
      await s.screenshot('restricted-read-only');
      // Nothing was written: the same files, same sizes and times; no annotations file anywhere.
      await new Promise((r) => setTimeout(r, 1500));
      const after = snapshot(s.workspaceDir);
      assert.deepEqual([...after.keys()].sort(), [...before.keys()].sort(), 'no file appeared or vanished');
      for (const [f, v] of before) assert.equal(after.get(f), v, `${f} is unchanged`);
      assert.ok(![...after.keys()].some((f) => f.endsWith('.valleys.json')), 'no annotations file');
    } catch (e) {
      await s.screenshot('failed-restricted').catch(() => undefined);
      throw e;
    }
  });
});
