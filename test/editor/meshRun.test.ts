/**
 * Scenario in a real VS Code (code-server) with the packaged extension: the demo's mesh run (a self-consistent
 * run on a Γ-centred 12×12×12 mesh of the simple-cubic tight-binding model in scripts/meshModel, VASP's layout,
 * fixtures/demo/tessellite-mesh) opens in the band view as its interpolated bands along the standard path, with
 * the interpolation caution, its mesh points on the path drawn as markers with their accessible text, and a save
 * from that view refused with the reason (the annotations of a mesh run are its mesh analysis).
 */
import assert from 'node:assert/strict';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { SharedSession } from './support/sharedSession';
import { type EditorSession, waitFor } from './support/editorSession';
import { waitForBandView } from './support/bandViewDriver';

const repo = (...p: string[]): string => join(__dirname, '..', '..', ...p);

const shared = new SharedSession({ name: 'mesh-run', workspace: [[repo('fixtures', 'demo', 'tessellite-mesh'), 'tessellite-mesh']] });
const session = (): Promise<EditorSession> => shared.get();

describe('in a real VS Code: a mesh run opens as interpolated bands with its mesh points, and is not saved from there', function () {
  this.timeout(300_000);

  shared.hooks({ closeEditors: true });

  it('the demo mesh run: caution, mesh-point markers with their text, and the save refusal', async () => {
    const s = await session();
    await s.openFile('tessellite-mesh/EIGENVAL');
    await s.clickCodeLens('Open band view');
    const view = await waitForBandView(s, 'tessellite-mesh/EIGENVAL');
    const cautions = await view.locator('.vs-cautions').innerText();
    assert.match(cautions, /Interpolated from a 12×12×12 mesh/);
    assert.match(cautions, /The markers are the run's own energies at the \d+ mesh points on the path \(data\)/);
    // The markers and what a screen reader is told about them (the SVG itself is hidden from assistive technology).
    const markers = view.locator('g.vs-mesh-points path.vs-mesh-point');
    await markers.first().waitFor({ state: 'attached', timeout: 30_000 });
    assert.ok((await markers.count()) > 0);
    assert.match(
      (await markers.first().locator('title').textContent()) ?? '',
      /^Mesh point \(data\): band \d+, k = .* \(k-point \d+ of the file/,
    );
    const label = (await view.locator('.vs-plot').getAttribute('aria-label')) ?? '';
    assert.match(label, /\d+ points of the 12×12×12 mesh lie on this path: markers, mesh point \(data\); the lines are interpolated\./);
    await s.screenshot('mesh-run-interpolated');
    // Saving from this view is refused: nothing written, the reason in the status line.
    await view.locator('.vs-save').click();
    const status = await waitFor(
      async () => {
        const t = (await view.locator('.vs-status').innerText()).trim();
        return /^Not saved/.test(t) ? t : undefined;
      },
      'no "Not saved" message',
      30_000,
    );
    assert.match(status, /^Not saved: these bands are interpolated from the 12×12×12 mesh/);
    assert.equal(existsSync(join(s.path('tessellite-mesh'), 'EIGENVAL.valleys.json')), false, 'no annotations file written');
    await s.screenshot('mesh-run-save-refused');
  });
});
