import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { mergeAnnotations } from '../../../src/core/annotations/mergeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { compareAnnotations, EXACT_TOLERANCES } from '../../../src/core/annotations/compareAnnotations';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import type { AnnotationsDoc } from '../../../src/core/annotations/annotationsModel';
import type { Report } from '../../../src/core/model';
import { analyticReport } from './analyticReport';
import { docArb, fuzzParams, fuzzTimeout } from './arbitraries';

const SOURCE = { format: 'vasp-eigenval', file: 'EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: 'c'.repeat(64) }] };
const build = (r: Report): AnnotationsDoc => buildAnnotations(r, SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });

/** The analytic report's file as a reviewer left it: notes, statuses and fields of their own everywhere. */
function reviewedText(): string {
  const text = serializeAnnotations(build(analyticReport()));
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- test-only edits of the written JSON, as a person would
  const o = JSON.parse(text) as Record<string, any>;
  o.note = 'Gap checked against the model value.';
  o.reviewers = ['ana', 'bo'];
  o.sources[0].origin = 'cluster scratch';
  o.settings.why = 'window as in the paper';
  o.gap.experiment_eV = 1.52;
  const cbm = o.entries.find((e: { kind: string }) => e.kind === 'cbm');
  cbm.note = 'Light electron, as expected.';
  cbm.status = 'accepted';
  cbm.ticket = { id: 42, open: false };
  cbm.masses[0].checkedBy = 'ana';
  const vbm = o.entries.find((e: { kind: string }) => e.kind === 'vbm');
  vbm.status = 'questioned';
  vbm.note = 'Needs spin-orbit.';
  // An extremum the reviewer added by hand (or an older analysis found), which the new analysis does not report.
  o.entries.push({
    kind: 'valley',
    spin: 0,
    band: 3,
    k: [0.25, 0, 0],
    energy_eV: 8.1,
    note: 'Satellite valley seen in run 1.',
    status: 'questioned',
  });
  return serializeAnnotations(parseAnnotations(JSON.stringify(o, null, 2), 'reviewed'));
}

describe('annotations merge', function () {
  this.timeout(fuzzTimeout());
  it('keeps every note, status and hand-added field; numbers come from the new analysis', () => {
    const older = parseAnnotations(reviewedText(), 'EIGENVAL.valleys.json');
    const r = analyticReport();
    r.extrema.find((e) => e.kind === 'cbm')!.masses[0]!.mass *= 1.1;
    r.extrema.find((e) => e.kind === 'cbm')!.eV -= 0.05;
    r.gap!.eV -= 0.05;
    const merged = mergeAnnotations(older, build(r));
    const text = serializeAnnotations(merged);
    const back = parseAnnotations(text, 'merged');
    assert.equal(back.note, 'Gap checked against the model value.');
    assert.deepEqual(back.extra.reviewers, ['ana', 'bo']);
    assert.equal(back.sources[0]!.extra.origin, 'cluster scratch');
    assert.equal(back.settings.extra.why, 'window as in the paper');
    assert.equal(back.gap!.extra.experiment_eV, 1.52);
    const cbm = back.entries.find((e) => e.kind === 'cbm')!;
    assert.equal(cbm.note, 'Light electron, as expected.');
    assert.equal(cbm.status, 'accepted');
    assert.deepEqual(JSON.parse(JSON.stringify(cbm.extra.ticket)), { id: 42, open: false });
    assert.equal(cbm.masses[0]!.extra.checkedBy, 'ana');
    // m_c · 1.1 = 0.13097 m_e (analytic model scaled by the test), and E_g − 50 meV.
    assert.equal(cbm.masses[0]!.mass, 0.131);
    assert.equal(cbm.energy_eV, 1.45);
    assert.equal(back.gap!.eV, 1.45);
    const vbm = back.entries.find((e) => e.kind === 'vbm')!;
    assert.deepEqual([vbm.status, vbm.note], ['questioned', 'Needs spin-orbit.']);
  });

  it('keeps an entry the new analysis no longer finds, marked found: false, and never duplicates it', () => {
    const older = parseAnnotations(reviewedText(), 'x');
    const once = mergeAnnotations(older, build(analyticReport()));
    const valley = once.entries.find((e) => e.kind === 'valley')!;
    assert.equal(valley.found, false);
    assert.equal(valley.note, 'Satellite valley seen in run 1.');
    assert.equal(valley.energy_eV, 8.1);
    assert.equal(once.entries.length, 3);
    const twice = mergeAnnotations(parseAnnotations(serializeAnnotations(once), 'x'), build(analyticReport()));
    assert.equal(serializeAnnotations(twice), serializeAnnotations(once));
    assert.match(serializeAnnotations(twice), /"found": false/);
  });

  it('marks an entry found again when the analysis finds it again, keeping its note', () => {
    const older = parseAnnotations(reviewedText(), 'x');
    const lost = mergeAnnotations(older, build(analyticReport()));
    const r = analyticReport();
    const cbm = r.extrema.find((e) => e.kind === 'cbm')!;
    r.extrema.push({ ...cbm, kind: 'valley', band: 3, k: [0.25, 0, 0], eV: 8.1, label: null, offset_eV: 6.6 });
    const refound = mergeAnnotations(lost, build(r));
    const valley = refound.entries.find((e) => e.kind === 'valley')!;
    assert.equal(valley.found, true);
    assert.equal(valley.note, 'Satellite valley seen in run 1.');
    const changes = compareAnnotations(lost, refound, EXACT_TOLERANCES);
    assert.ok(changes.some((c) => c.kind === 'refound' && c.subject === valley.id));
  });

  it('follows an extremum whose fitted k moved a little: the note goes with it, the id follows k', () => {
    const older = parseAnnotations(reviewedText(), 'x');
    const r = analyticReport();
    r.extrema.find((e) => e.kind === 'cbm')!.k = [0.004, 0, 0];
    const merged = mergeAnnotations(older, build(r));
    const cbm = merged.entries.filter((e) => e.kind === 'cbm');
    assert.equal(cbm.length, 1);
    assert.equal(cbm[0]!.note, 'Light electron, as expected.');
    assert.equal(cbm[0]!.id, 'cbm/e1/v=0.004,0,0');
    assert.equal(cbm[0]!.found, true);
  });

  it('merges through buildAnnotations when given the existing document', () => {
    const older = parseAnnotations(reviewedText(), 'x');
    const viaBuild = buildAnnotations(analyticReport(), SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0', existing: older });
    assert.equal(serializeAnnotations(viaBuild), serializeAnnotations(mergeAnnotations(older, build(analyticReport()))));
    assert.equal(viaBuild.entries.find((e) => e.kind === 'cbm')!.note, 'Light electron, as expected.');
  });

  it('loses nothing a person wrote, for any pair of documents', () => {
    fc.assert(
      fc.property(docArb, docArb, (older, fresh) => {
        const merged = mergeAnnotations(older, fresh);
        const text = serializeAnnotations(merged);
        const back = parseAnnotations(text, 'merged');
        for (const e of older.entries) {
          // Every older entry is still there (by id, or by a match that carried its note and status).
          // (The absolute band is not part of an entry's identity: the same extremum may sit on another index.)
          const same = back.entries.filter(
            (b) => b.note.includes(e.note) && (b.status === e.status || e.status === 'unreviewed') && b.kind === e.kind,
          );
          assert.ok(same.length >= 1, `entry ${e.id} lost`);
        }
        for (const k of Object.keys(older.extra)) assert.ok(k in back.extra, `top-level field ${k} lost`);
        assert.equal(back.entries.length >= older.entries.length, true);
        if (older.note !== '') assert.equal(back.note, older.note);
      }),
      fuzzParams(150),
    );
  });
});
