import assert from 'node:assert/strict';
import { composeAnnotations, joinNotes } from '../../../src/core/annotations/composeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { ReaderError } from '../../../src/core/errors';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { fitExtremumAt } from '../../../src/core/analysis/massEngine';
import { nearestKIndex } from '../../../src/extension/bandData';
import { composeInputOf, loadSi } from '../extension/demoRun';

async function base() {
  const si = await loadSi();
  const input = composeInputOf(si);
  return { si, input };
}

describe('annotations: composing the file (CLI annotate and the editor save)', () => {
  it('without an existing file, holds the numbers of the analysis (what `valleyscope analyze` reports)', async () => {
    const { si, input } = await base();
    const c = composeAnnotations(input);
    const doc = parseAnnotations(c.text, 'x');
    assert.equal(doc.gap!.eV.toFixed(4), si.report.gap!.eV.toFixed(4));
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    const rcbm = si.report.extrema.find((x) => x.kind === 'cbm')!;
    assert.equal(cbm.masses.length, rcbm.masses.length);
    // The file writes masses to 4 significant digits (its documented layout): compare to half a unit of the last.
    cbm.masses.forEach((m, i) => {
      const want = rcbm.masses[i]!.mass;
      assert.ok(Math.abs(m.mass! - want) <= 0.5e-3 * Math.abs(want) + 1e-12, `${m.towards}: ${m.mass} vs ${want}`);
    });
    assert.equal(doc.entries.length, si.report.extrema.length);
    assert.equal(c.counts.notFound, 0);
  });

  it('keeps notes, statuses and hand-added fields of the file, and adds a note typed in the view', async () => {
    const { si, input } = await base();
    const first = JSON.parse(composeAnnotations(input).text) as { note: string; entries: Record<string, unknown>[]; reviewedBy?: string };
    first.note = 'Reviewed on the cluster.';
    first.reviewedBy = 'A. Reviewer';
    const cbmJson = first.entries.find((e) => e.kind === 'cbm')!;
    cbmJson.status = 'accepted';
    cbmJson.note = 'Δ valley, as expected.';
    cbmJson.myFlag = true;
    const existingText = JSON.stringify(first, null, 2);
    const b = nearestKIndex(si.bs, si.report.gap!.cbm.k);
    const c = composeAnnotations({
      ...input,
      existingText,
      fits: [{ spin: 0, kIndex: b, band0: 4, window_meV: 50, method: DEFAULT_SETTINGS.method, note: 'Refit with 50 meV.' }],
      runNote: 'Gap checked.',
    });
    const doc = parseAnnotations(c.text, 'x');
    assert.equal(doc.note, 'Reviewed on the cluster.\nGap checked.');
    assert.equal(doc.extra.reviewedBy, 'A. Reviewer');
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.status, 'accepted');
    assert.equal(cbm.note, 'Δ valley, as expected.\nRefit with 50 meV.');
    assert.equal(cbm.extra.myFlag, true);
    // The reviewer's window, with its provenance, replaced the default one for this entry only.
    assert.ok(cbm.masses.every((m) => m.window_meV >= 50));
    const cbmDefault = si.report.extrema.find((x) => x.kind === 'cbm')!;
    assert.ok(
      cbmDefault.masses.some((m) => m.window_meV < 50),
      'the default fit used a smaller window',
    );
    const vbm = doc.entries.find((e) => e.kind === 'vbm')!;
    const vbmReport = si.report.extrema.find((x) => x.kind === 'vbm')!;
    assert.equal(vbm.masses.length, vbmReport.masses.length);
    // The file rounds numbers to what they can carry (4–5 significant digits): compare to 0.1 %.
    vbm.masses.forEach((m, i) =>
      assert.ok(Math.abs(m.window_meV - vbmReport.masses[i]!.window_meV) <= 1e-3 * vbmReport.masses[i]!.window_meV, `${m.window_meV}`),
    );
  });

  it('keeps an entry the analysis no longer finds, marked as not found', async () => {
    const { input } = await base();
    const first = JSON.parse(composeAnnotations(input).text) as { entries: Record<string, unknown>[] };
    const ghost = { ...first.entries[0]!, kind: 'valley', band: 7, k: [0.1, 0.2, 0.3], note: 'old valley', id: undefined };
    delete ghost.id;
    first.entries.push(ghost);
    const c = composeAnnotations({ ...input, existingText: JSON.stringify(first) });
    const doc = parseAnnotations(c.text, 'x');
    const kept = doc.entries.find((e) => e.note === 'old valley')!;
    assert.equal(kept.found, false);
    assert.equal(c.counts.notFound, 1);
  });

  it('refuses to merge into a file it cannot read, naming the line', async () => {
    const { input } = await base();
    const broken = '{\n  "valleyscopeAnnotations": 1,\n  "note": "half typed\n}';
    assert.throws(
      () => composeAnnotations({ ...input, existingText: broken }),
      (e: unknown) => e instanceof ReaderError && e.line >= 3,
    );
  });

  it('puts a view fit in place of the same extremum, recording its window and method on the entry', async () => {
    const { si, input } = await base();
    const b = nearestKIndex(si.bs, si.report.gap!.cbm.k);
    const fit = fitExtremumAt(si.bs, 0, b, 4, { ...DEFAULT_SETTINGS, window_meV: 40 });
    const c = composeAnnotations({ ...input, fits: [{ spin: 0, kIndex: b, band0: 4, window_meV: 40, method: DEFAULT_SETTINGS.method }] });
    assert.equal(c.doc.entries.length, si.report.extrema.length);
    const cbm = c.doc.entries.find((x) => x.kind === 'cbm')!;
    // The same fit as the engine's at this point, under the valley the analysis gave this extremum.
    assert.deepEqual(
      cbm.masses.map((m) => m.mass),
      fit.masses.map((m) => m.mass),
    );
    assert.deepEqual(cbm.valley, si.report.extrema.find((x) => x.kind === 'cbm')!.valley);
    assert.equal(cbm.fit?.window_meV, 40);
    assert.equal(cbm.fit?.method, DEFAULT_SETTINGS.method);
    assert.ok(
      c.doc.entries.filter((x) => x.kind !== 'cbm').every((x) => x.fit === null),
      'only the chosen entry records a fit',
    );
  });

  it('joins notes without losing or repeating what was written', () => {
    assert.equal(joinNotes('', 'new'), 'new');
    assert.equal(joinNotes('old', undefined), 'old');
    assert.equal(joinNotes('old', '  '), 'old');
    assert.equal(joinNotes('old', 'new'), 'old\nnew');
    assert.equal(joinNotes('old\nnew', 'new'), 'old\nnew');
  });
});
