/**
 * Scenarios in a real VS Code (code-server) with the packaged extension: the saved review of an annotated run
 * shows in the band view, and a file cut inside a k-point block opens as partial. Data: Si from the empirical
 * pseudopotential model of Cohen & Bergstresser, Phys. Rev. 141, 789 (1966), on the standard fcc path, in
 * VASP's layout (fixtures/epm/si: 400 k-points, 12 bands). The annotations file is written by the command-line
 * twin (`annotate`), then given a status and a note as a reviewer would by hand.
 */
import assert from 'node:assert/strict';
import { readFileSync, writeFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import type { FrameLocator } from 'playwright-core';
import { SharedSession } from './support/sharedSession';
import { type EditorSession, waitFor } from './support/editorSession';
import { massRows, waitForBandView } from './support/bandViewDriver';

const repo = (...p: string[]): string => join(__dirname, '..', '..', ...p);

const shared = new SharedSession({
  name: 'reviews',
  workspace: [
    [repo('fixtures', 'epm', 'si'), 'si-reviewed'],
    [repo('fixtures', 'epm', 'si'), 'si-cut'],
  ],
});
const session = (): Promise<EditorSession> => shared.get();

async function fitCbmByKeys(s: EditorSession, view: FrameLocator): Promise<void> {
  await view.locator('.vs-plot').focus();
  await s.page.keyboard.press('ArrowUp'); // nothing selected: Up starts at the CBM
  await s.page.keyboard.press('Enter');
  await massRows(view);
}

describe('in a real VS Code: saved reviews in the band view; a file cut short opens as partial', function () {
  this.timeout(300_000);

  shared.hooks({ closeEditors: true });

  it('an annotated run: the CBM fit shows its saved status and note', async () => {
    const s = await session();
    const data = s.path('si-reviewed', 'EIGENVAL');
    execFileSync(process.execPath, [join(s.env.repoRoot, 'dist', 'cli.js'), 'annotate', data], { encoding: 'utf8' });
    const file = `${data}.valleys.json`;
    const json = JSON.parse(readFileSync(file, 'utf8')) as { entries: { kind: string; status: string; note: string }[] };
    const cbm = json.entries.find((e) => e.kind === 'cbm');
    assert.ok(cbm, 'annotate wrote a CBM entry');
    cbm.status = 'questioned';
    cbm.note = 'Check the window: the band bends within 40 meV.';
    writeFileSync(file, JSON.stringify(json, null, 2));
    await s.openFile('si-reviewed/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-reviewed/EIGENVAL');
    await fitCbmByKeys(s, view);
    const box = view.locator('.vs-review');
    await waitFor(async () => ((await box.isVisible()) ? true : undefined), 'the saved review is not shown', 30_000);
    const text = await box.innerText();
    await s.screenshot('band-view-saved-review');
    assert.match(text, /Review: questioned/);
    assert.match(text, /Check the window: the band bends within 40 meV\./);
  });

  it('a file cut inside k-point 218 of 400 opens with the 217 complete k-points, marked partial', async () => {
    const s = await session();
    const data = s.path('si-cut', 'EIGENVAL');
    const lines = readFileSync(data, 'utf8').split('\n');
    // VASP's layout: 6 header lines, then per k-point a blank line, the k-point line and 12 band lines.
    const kLine = (k: number): number => 6 + k * 14 + 1;
    writeFileSync(data, lines.slice(0, kLine(217) + 6).join('\n') + '\n' + lines[kLine(217) + 6]!.slice(0, 14));
    await s.openFile('si-cut/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'si-cut/EIGENVAL');
    const banner = await view.locator('.vs-banner').innerText();
    await s.screenshot('band-view-cut-file');
    assert.match(banner, /Partial data/);
    assert.match(banner, /217 of the 400 k-points/);
  });
});
