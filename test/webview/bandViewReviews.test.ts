/**
 * Saved review statuses and notes of an annotated run are shown in the band view's side panel for the fitted
 * extremum (host: src/extension/reviewMarks.ts places the file's entries on the arrays; view:
 * webview/bandView/reviewNote.ts). Data: silicon from the empirical pseudopotential model of Cohen &
 * Bergstresser, Phys. Rev. 141, 789 (1966) (fixtures/epm/si); the annotations file is composed by the
 * extension's own save path from the core's analysis of that run.
 */
import assert from 'node:assert/strict';
import { openWithRun, startHarness, type Harness, type ViewPage } from './support/bandViewHarness';
import { hostFitResult, loadRunForView, type LoadedRun } from './support/coreBandData';
import { waitForExpression } from './support/pageHelpers';
import { HostToViewType, type FitTarget, type ReviewsMessage } from '../../src/protocol';
import { composeAnnotations } from '../../src/core/annotations/composeAnnotations';
import { parseAnnotations } from '../../src/core/annotations/parseAnnotations';
import { reviewMarks } from '../../src/extension/reviewMarks';
import { DEFAULT_SETTINGS } from '../../src/core/analysis/analyze';

/** Select with the keyboard (Up: the CBM, Down: the VBM, from nothing), Enter, and answer as the host does. */
async function fitByKey(v: ViewPage, run: LoadedRun, key: 'ArrowUp' | 'ArrowDown'): Promise<void> {
  await v.page.focus('.vs-plot');
  await v.page.keyboard.press('Escape');
  await v.page.keyboard.press(key);
  const before = (await v.posted()).filter((m) => m.type === 'requestFit').length;
  await v.page.keyboard.press('Enter');
  await waitForExpression(v.page, `window.__posted.filter(function (m) { return m.type === 'requestFit'; }).length >= ${before + 1}`);
  const req = (await v.posted()).filter((m) => m.type === 'requestFit').pop()!;
  const t: FitTarget = { spin: req.spin as 0 | 1, kIndex: req.kIndex as number, band0: req.band0 as number };
  await v.hostPost(hostFitResult(run, req.requestId as number, t, req.window_meV as number, req.method as string, false));
  await v.page.waitForSelector('.vs-fit-body:not([hidden])');
}

describe('band view: saved reviews in the side panel', function () {
  this.timeout(90_000);
  let h: Harness;
  let run: LoadedRun;
  let reviews: ReviewsMessage;

  before(async () => {
    h = await startHarness();
    run = await loadRunForView('fixtures/epm/si', 'Si (EPM)');
    const c = composeAnnotations({
      bs: run.bs,
      report: run.report,
      source: run.bs.source,
      settings: DEFAULT_SETTINGS,
      toolVersion: 'test',
      fits: [],
      existingText: null,
      existingName: 'EIGENVAL.valleys.json',
    });
    const json = JSON.parse(c.text) as { entries: { kind: string; status: string; note: string }[] };
    const cbm = json.entries.find((e) => e.kind === 'cbm')!;
    cbm.status = 'questioned';
    cbm.note = 'Δ valley: window too wide? <b>not markup</b>';
    const doc = parseAnnotations(JSON.stringify(json), 'EIGENVAL.valleys.json');
    reviews = { type: HostToViewType.Reviews, file: 'EIGENVAL.valleys.json', reviews: reviewMarks(doc, run.bs), problem: null };
  });
  after(async () => {
    if (h) await h.close();
  });

  it('places only reviewed entries on the arrays: the CBM, at its k-point and band', () => {
    const cbm = run.data.marks.find((m) => m.kind === 'cbm')!;
    assert.deepEqual(
      reviews.reviews.map((r) => [r.kIndex, r.band0, r.status]),
      [[cbm.kIndex, cbm.band0, 'questioned']],
    );
  });

  it('shows the status and note of the fitted CBM (as text), and nothing for the unreviewed VBM', async () => {
    const v = await openWithRun(h, run);
    await v.hostPost(reviews);
    await fitByKey(v, run, 'ArrowUp');
    await v.page.waitForSelector('.vs-review:not([hidden])');
    const text = (await v.page.locator('.vs-review').textContent()) ?? '';
    assert.match(text, /Review: questioned/);
    assert.match(text, /saved in EIGENVAL\.valleys\.json/);
    assert.match(text, /Δ valley: window too wide\? <b>not markup<\/b>/);
    assert.equal(await v.page.locator('.vs-review b').count(), 0, 'the note is text, not markup');
    // Control: the VBM has no review in the file, so nothing is shown for it.
    await fitByKey(v, run, 'ArrowDown');
    await waitForExpression(v.page, "document.querySelector('.vs-review').hidden === true");
    await v.page.screenshot({ path: 'test-artifacts/bandview-review.png' }).catch(() => undefined);
    assert.deepEqual(v.errors, []);
    await v.page.close();
  });

  it('a file that could not be read is said in the panel, not silently ignored', async () => {
    const v = await openWithRun(h, run);
    await v.hostPost({
      type: HostToViewType.Reviews,
      file: 'EIGENVAL.valleys.json',
      reviews: [],
      problem: 'EIGENVAL.valleys.json could not be read: line 3, column 5: bad JSON',
    });
    await fitByKey(v, run, 'ArrowUp');
    await v.page.waitForSelector('.vs-review:not([hidden])');
    assert.match((await v.page.locator('.vs-review').textContent()) ?? '', /Saved reviews not shown: .*line 3, column 5/);
    await v.page.close();
  });
});
