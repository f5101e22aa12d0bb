/**
 * One definition of an annotated extremum (core/annotations/chosenFits.ts): fits a reviewer chose with their
 * own window and method, saved from the band view, are found again by `check` with the same numbers, and
 * survive `annotate`. Data: the demo silicon run (fixtures/demo/si-bulk: Cohen & Bergstresser's empirical
 * pseudopotential bands, Phys. Rev. 141, 789 (1966), in VASP's EIGENVAL layout).
 */
import { strict as assert } from 'node:assert';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { checkFile } from '../../../src/cli/commands/check';
import { composeAnnotations } from '../../../src/core/annotations/composeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { annotatedSources, analysisSettingsOf } from '../../../src/core/annotations/buildAnnotations';
import { checkAnnotations } from '../../../src/core/annotations/checkAnnotations';
import { reanalyzeAsRecorded } from '../../../src/core/annotations/chosenFits';
import { DEFAULT_TOLERANCES } from '../../../src/core/annotations/compareAnnotations';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { CENTRAL_4, POLY4 } from '../../../src/core/analysis/methods';
import { kpointAt } from '../../../src/core/model';
import { loadSi, SI_DIR } from '../extension/demoRun';
import { cli } from './runCli';

/** The k index of fractional k in the run, or -1. */
function indexOf(bs: Awaited<ReturnType<typeof loadSi>>['bs'], k: readonly number[]): number {
  for (let i = 0; i < bs.nk; i++) if (kpointAt(bs, i).every((x, j) => Math.abs(x - k[j]!) < 1e-6)) return i;
  return -1;
}

describe('annotations: a chosen fit is what check finds again', function () {
  this.timeout(120000);

  /** The L valley of the lowest conduction band and the CBM, each fitted with its own window and method. */
  async function saved() {
    const si = await loadSi();
    // L = (1/2, 1/2, 1/2) in fcc reciprocal coordinates (common practice: the fcc zone's L point).
    const kL = indexOf(si.bs, [0.5, 0.5, 0.5]);
    assert.ok(kL >= 0, 'the demo path passes through L');
    const cbm = si.report.gap!.cbm;
    const kC = indexOf(si.bs, cbm.k);
    const fits = [
      { spin: 0 as const, kIndex: kL, band0: cbm.band - 1, window_meV: 60, method: POLY4, note: 'L valley' },
      { spin: 0 as const, kIndex: kC, band0: cbm.band - 1, window_meV: 35, method: CENTRAL_4 },
    ];
    const c = composeAnnotations({
      bs: si.bs,
      report: si.report,
      source: si.bs.source,
      settings: DEFAULT_SETTINGS,
      toolVersion: 'test',
      fits,
      existingText: null,
      existingName: 'EIGENVAL.valleys.json',
    });
    return { si, c, kL };
  }

  it('records the window and method on the chosen entries; the L valley the analysis does not list is added', async () => {
    const { si, c } = await saved();
    const doc = parseAnnotations(c.text, 'x');
    const l = doc.entries.find((e) => e.k.every((x) => Math.abs(x - 0.5) < 1e-9))!;
    assert.ok(l, 'an entry at L');
    assert.ok(
      !si.report.extrema.some((x) => x.k.every((v) => Math.abs(v - 0.5) < 1e-9)),
      'control: the analysis alone lists no extremum at L',
    );
    assert.deepEqual({ w: l.fit?.window_meV, m: l.fit?.method }, { w: 60, m: POLY4 });
    assert.equal(l.note, 'L valley');
    assert.equal(l.kind, 'valley');
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    assert.deepEqual({ w: cbm.fit?.window_meV, m: cbm.fit?.method }, { w: 35, m: CENTRAL_4 });
    assert.ok(cbm.masses.every((m) => m.method === CENTRAL_4));
    // The written text reads back to the same bytes (the stable writer), the fit included.
    assert.equal(serializeAnnotations(doc), c.text);
  });

  it('check (core) is clean after the save; with the run settings alone it is not (the test can fail)', async () => {
    const { si, c } = await saved();
    const doc = parseAnnotations(c.text, 'x');
    const sources = annotatedSources(si.bs.source);
    const r = checkAnnotations(doc, sources, reanalyzeAsRecorded(doc, si.bs), DEFAULT_TOLERANCES);
    assert.deepEqual(
      r.drifted.map((d) => d.message),
      [],
    );
    assert.ok(r.ok);
    const bare = checkAnnotations(doc, sources, analyzeBandStructure(si.bs, analysisSettingsOf(doc)), DEFAULT_TOLERANCES);
    assert.ok(!bare.ok, 'without redoing the chosen fits the L entry is lost and the CBM masses move');
    assert.ok(bare.drifted.some((d) => d.kind === 'lost'));
  });

  it('the CLI: save, `check` exits 0; `annotate` keeps the chosen fits; a changed recorded window drifts', async () => {
    const { c } = await saved();
    const dir = mkdtempSync(join(tmpdir(), 'vs-chosen-'));
    try {
      cpSync(SI_DIR, dir, { recursive: true, filter: (p) => !p.endsWith('.valleys.json') });
      const file = join(dir, 'EIGENVAL.valleys.json');
      writeFileSync(file, c.text);
      const first = await cli('check', dir);
      assert.equal(first.code, 0, first.out + first.err);
      const a = await cli('annotate', join(dir, 'EIGENVAL'));
      assert.equal(a.code, 0, a.err);
      const after = parseAnnotations(readFileSync(file, 'utf8'), file);
      assert.equal(after.entries.filter((e) => e.fit !== null).length, 2, 'annotate keeps both chosen fits');
      assert.equal((await cli('check', dir)).code, 0);
      // Control: the CBM's recorded fit edited by hand to a wide parabola; a band is not a parabola 250 meV
      // from its minimum (common practice: nonparabolicity), so the masses found now differ from the file's.
      const doc = parseAnnotations(c.text, file);
      const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
      cbm.fit = { window_meV: 250, method: 'parabola', extra: cbm.fit!.extra };
      writeFileSync(file, serializeAnnotations(doc));
      const out = await checkFile(file, DEFAULT_TOLERANCES);
      assert.ok(out.result && !out.result.ok, 'a different window gives different masses');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
