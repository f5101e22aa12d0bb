import { strict as assert } from 'node:assert';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { TINY, writeTinyRun } from './tinyRun';
import { cli } from './runCli';

describe('valleyscope annotate and check', () => {
  let root = '';
  let runDir = '';
  let eig = '';
  let ann = '';
  beforeEach(() => {
    root = mkdtempSync(join(tmpdir(), 'vs-check-'));
    runDir = join(root, 'runs', 'cubic');
    eig = writeTinyRun(runDir);
    ann = `${eig}.valleys.json`;
  });
  afterEach(() => rmSync(root, { recursive: true, force: true }));

  it('creates the file beside the data, and a second run changes nothing', async () => {
    const first = await cli('annotate', runDir);
    assert.equal(first.code, 0, first.err);
    assert.match(first.out, /created with \d+ entries/);
    assert.match(first.out, /cbm\/e1\/v=0,0,0/);
    const bytes = readFileSync(ann);
    const second = await cli('annotate', runDir);
    assert.equal(second.code, 0, second.err);
    assert.match(second.out, /unchanged/);
    assert.ok(readFileSync(ann).equals(bytes), 'byte-identical after a second annotate');
    assert.deepEqual(readdirSync(runDir).sort(), ['EIGENVAL', 'EIGENVAL.valleys.json', 'KPOINTS', 'POSCAR']);
  });

  it('passes on fresh annotations and fails after one eigenvalue moves by 50 meV, naming the entry and the change', async () => {
    assert.equal((await cli('annotate', eig)).code, 0);
    const ok = await cli('check', root);
    assert.equal(ok.code, 0, ok.out + ok.err);
    assert.match(ok.out, /^ok\s+.*EIGENVAL\.valleys\.json/m);

    // The conduction-band minimum at Γ (band 2, k-point 1) goes down by 50 meV: E_g 1.5 → 1.45 eV
    // (analytic model of tinyRun.ts; the EIGENVAL keeps 6 decimals, so the change is exact).
    writeTinyRun(runDir, { shift: [0, 2, -0.05] });
    const bad = await cli('check', root);
    assert.equal(bad.code, 1);
    assert.match(bad.out, /stale:\s+source EIGENVAL \(eigenvalues\) has changed/);
    assert.match(
      bad.out,
      /drifted: cbm\/e1\/v=0,0,0 \(CBM, band 2 \(1st from the edge\), at Γ \(0, 0, 0\)\): energy 1\.5000 eV → 1\.4500 eV \(−50\.0 meV; tolerance 1 meV\)/,
    );
    assert.match(bad.out, /drifted: band gap: fundamental gap 1\.5000 eV → 1\.4500 eV \(−50\.0 meV/);
    assert.match(bad.out, /0 match their data, 1 stale or drifted/);
  });

  it('reports a change below the tolerance as stale (the hash) but not as drift', async () => {
    await cli('annotate', runDir);
    // 0.5 meV on the CBM: below the 1 meV default tolerance (issue 5).
    writeTinyRun(runDir, { shift: [0, 2, -0.0005] });
    const r = await cli('check', ann);
    assert.equal(r.code, 1);
    assert.match(r.out, /^STALE\s/m);
    assert.doesNotMatch(r.out, /drifted:/);
    const loose = await cli('check', ann, '--energy-tolerance', '100', '--mass-tolerance', '50');
    assert.equal(loose.code, 1, 'a changed hash fails whatever the tolerance');
    writeTinyRun(runDir, { shift: [0, 2, -0.002] });
    const beyond = await cli('check', ann);
    assert.match(beyond.out, /drifted: .*energy 1\.5000 eV → 1\.4980 eV \(−2\.0 meV; tolerance 1 meV\)/);
  });

  it('reports only staleness when bytes change but no number does', async () => {
    await cli('annotate', runDir);
    writeTinyRun(runDir, { system: 'same model, new comment' });
    const r = await cli('check', runDir);
    assert.equal(r.code, 1);
    assert.match(r.out, /stale:\s+source EIGENVAL/);
    assert.doesNotMatch(r.out, /drifted:/);
  });

  it("re-annotating after a change keeps the reviewer's words, lists what changed, and check passes again", async () => {
    await cli('annotate', runDir);
    const doc = parseAnnotations(readFileSync(ann, 'utf8'), ann);
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    cbm.note = 'Compared with the model: fine.';
    cbm.status = 'accepted';
    doc.extra.pr = 'review #7';
    writeFileSync(ann, serializeAnnotations(doc));
    writeTinyRun(runDir, { shift: [0, 2, -0.05] });
    const r = await cli('annotate', runDir);
    assert.equal(r.code, 0, r.err);
    assert.match(r.out, /updated; \d+ changes; reviewed 1 entry: 1 kept\n/);
    assert.match(r.out, /energy 1\.5000 eV → 1\.4500 eV \(−50\.0 meV\)/);
    const after = parseAnnotations(readFileSync(ann, 'utf8'), ann);
    const c = after.entries.find((e) => e.kind === 'cbm')!;
    assert.deepEqual([c.note, c.status], ['Compared with the model: fine.', 'accepted']);
    assert.equal(after.extra.pr, 'review #7');
    assert.equal((await cli('check', root)).code, 0);
  });

  it('prints a Markdown summary for a review comment', async () => {
    await cli('annotate', runDir);
    writeTinyRun(runDir, { shift: [0, 2, -0.05] });
    const r = await cli('check', root, '--format', 'md');
    assert.equal(r.code, 1);
    assert.match(r.out, /^\*\*Valleyscope check:\*\* 1 annotations file checked/);
    assert.match(r.out, /\| run \| status \| gap \(eV\) \| reviewed \| what moved \|/);
    // One row for the run: stale and drifted, the recorded gap (E_g = 1.5 eV, tinyRun.ts), the first two things
    // that moved, and how many more.
    assert.match(
      r.out,
      /\| `[^`]*EIGENVAL\.valleys\.json` \| \*\*stale, drifted\*\* \| 1\.5000 direct \| 0\/2 \| source EIGENVAL .*; \d+ more below \|/,
    );
    assert.match(r.out, /<details><summary>/);
    // The details line of the run: the CBM by band from the edge, its mass, and the drifted energy (E_g − 50 meV).
    assert.match(r.out, /CBM, band 2 \(1st from the edge\), at Γ \(0, 0, 0\), m\* X 0\.120/);
    assert.match(r.out, /\*\*drifted:\*\* cbm\/e1\/v=0,0,0 .*energy 1\.5000 eV → 1\.4500 eV/);
    assert.equal(r.out.split('\n').filter((l) => /Semilocal DFT/.test(l)).length, 1, 'cautions once');
  });

  it('fails, with a sentence and a location, on an annotations file it cannot read, and leaves it alone', async () => {
    await cli('annotate', runDir);
    const broken = readFileSync(ann, 'utf8').replace('"note": "",\n  "entries"', '"note": ""\n  "entries"');
    writeFileSync(ann, broken);
    const c = await cli('check', root);
    assert.equal(c.code, 1);
    assert.match(c.out, /^FAIL\s+.*could not be checked: .*EIGENVAL\.valleys\.json:\d+:\d+: not valid JSON/m);
    const a = await cli('annotate', runDir);
    assert.equal(a.code, 1);
    assert.match(a.err, /not valid JSON.*left as it is/);
    assert.doesNotMatch(a.err, /\n\s+at /, 'no stack trace');
    assert.equal(readFileSync(ann, 'utf8'), broken, 'never overwritten');
  });

  it("fails with the reader's located sentence when the data file is damaged", async () => {
    await cli('annotate', runDir);
    const text = readFileSync(eig, 'utf8');
    writeFileSync(eig, text.slice(0, Math.floor(text.length / 2)));
    const r = await cli('check', root);
    assert.equal(r.code, 1);
    assert.match(r.out, /^FAIL\s+.*could not be checked: .*EIGENVAL:\d+(:\d+)?: .*(truncated|ends)/m);
    assert.doesNotMatch(r.out + r.err, /\n\s+at /, 'no stack trace');
  });

  it('fails when the data file is gone, and when there is nothing to check', async () => {
    await cli('annotate', runDir);
    rmSync(eig);
    const r = await cli('check', root);
    assert.equal(r.code, 1);
    assert.match(r.out, /could not be checked: the data file .*EIGENVAL it describes is missing/);
    const empty = join(root, 'empty');
    mkdirSync(empty);
    const none = await cli('check', empty);
    assert.equal(none.code, 1);
    assert.match(none.err, /no annotations files/);
  });

  it('takes no path from file content: paths inside the annotations never decide where anything is written', async () => {
    await cli('annotate', runDir);
    const o = JSON.parse(readFileSync(ann, 'utf8')) as { sources: { path: string }[]; writeTo?: string };
    o.sources[0]!.path = '../../escaped.valleys.json';
    o.sources.push({ path: join(root, 'absolute.txt'), role: 'eigenvalues', sha256: '0'.repeat(64) } as { path: string });
    o.writeTo = join(root, 'elsewhere.valleys.json');
    writeFileSync(ann, JSON.stringify(o, null, 2));
    const listing = (): string[] => readdirSync(root, { recursive: true }).map(String).sort();
    const before = listing();
    const r = await cli('annotate', runDir);
    assert.equal(r.code, 0, r.err);
    assert.deepEqual(listing(), before, 'no file created or removed anywhere');
    assert.ok(!existsSync(join(root, 'escaped.valleys.json')) && !existsSync(join(root, 'elsewhere.valleys.json')));
    const back = parseAnnotations(readFileSync(ann, 'utf8'), ann);
    assert.deepEqual(back.sources.map((s) => s.path).sort(), ['EIGENVAL', 'KPOINTS', 'POSCAR'], 'sources are what the run reads now');
    assert.equal(back.extra.writeTo, join(root, 'elsewhere.valleys.json'), 'the hand-added field is kept, and only kept');
  });

  it('records a structure file given with --structure as a source, and check reads it again', async () => {
    const bare = join(root, 'bare');
    mkdirSync(bare);
    writeFileSync(join(bare, 'EIGENVAL'), readFileSync(eig));
    mkdirSync(join(bare, 'cell'));
    writeFileSync(join(bare, 'cell', 'cubic.vasp'), readFileSync(join(runDir, 'POSCAR')));
    const r = await cli('annotate', join(bare, 'EIGENVAL'), '--structure', join(bare, 'cell', 'cubic.vasp'));
    assert.equal(r.code, 0, r.err);
    assert.equal(r.err, '', 'a structure file inside the run folder needs no warning');
    const doc = parseAnnotations(readFileSync(join(bare, 'EIGENVAL.valleys.json'), 'utf8'), 'bare');
    assert.equal(doc.settings.structureFile, 'cell/cubic.vasp');
    assert.ok(doc.sources.some((s) => s.path === 'cell/cubic.vasp' && s.role === 'structure'));
    // With the cell known, the masses are in m_e: the cosine-model CBM is light (analytic m_c = 0.119 m_e;
    // the fit over the coarse path reads it a little heavier).
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    assert.ok(cbm.masses.length > 0 && cbm.masses[0]!.mass! > 0.1 && cbm.masses[0]!.mass! < 0.14, `mass ${cbm.masses[0]?.mass}`);
    assert.equal((await cli('check', bare)).code, 0);
    // Re-annotating without the option keeps the recorded structure file.
    assert.match((await cli('annotate', bare)).out, /unchanged/);
    writeFileSync(join(bare, 'cell', 'cubic.vasp'), readFileSync(join(runDir, 'POSCAR'), 'utf8').replace('4.0 0.0 0.0', '4.1 0.0 0.0'));
    const stale = await cli('check', bare);
    assert.equal(stale.code, 1);
    assert.match(stale.out, /stale:\s+source cell\/cubic\.vasp \(structure\) has changed/);
    rmSync(join(bare, 'cell', 'cubic.vasp'));
    assert.match((await cli('check', bare)).out, /could not be checked: the structure file "cell\/cubic\.vasp" recorded in .* is missing/);
  });

  it('records a structure file outside the run folder with a warning; check then refuses to open it', async () => {
    const bare = join(root, 'bare-outside');
    mkdirSync(bare);
    writeFileSync(join(bare, 'EIGENVAL'), readFileSync(eig));
    const shared = join(root, 'shared');
    mkdirSync(shared);
    writeFileSync(join(shared, 'cubic.vasp'), readFileSync(join(runDir, 'POSCAR')));
    const r = await cli('annotate', join(bare, 'EIGENVAL'), '--structure', join(shared, 'cubic.vasp'));
    assert.equal(r.code, 0, r.err);
    assert.match(r.err, /outside the run's folder.*copy it beside the data file/);
    const doc = parseAnnotations(readFileSync(join(bare, 'EIGENVAL.valleys.json'), 'utf8'), 'bare');
    assert.equal(doc.settings.structureFile, '../shared/cubic.vasp');
    const checked = await cli('check', bare);
    assert.equal(checked.code, 1);
    assert.match(checked.out, /settings\.structureFile in .* climbs out of the run's folder.*it was not opened/);
  });

  it('re-analyses with the recorded settings, not the defaults', async () => {
    await cli('annotate', runDir, '--window', '100');
    const doc = parseAnnotations(readFileSync(ann, 'utf8'), ann);
    assert.equal(doc.settings.window_meV, 100);
    assert.equal((await cli('check', root)).code, 0);
    // Re-annotating without options keeps the recorded window.
    await cli('annotate', runDir);
    assert.equal(parseAnnotations(readFileSync(ann, 'utf8'), ann).settings.window_meV, 100);
    // The numbers themselves: the model's gap (analytic model, tinyRun.ts).
    assert.equal(doc.gap!.eV, TINY.gap_eV);
  });
});
