/**
 * The file-access contract and the smaller hardening items: the node accessor reads only regular files and
 * never more than asked; the path policy's lexical rules; reader sentences about files the user did not name
 * lose their quotes; a binary KPOINTS and absurd k-points get sentences; long data-file names can be
 * annotated; killed writes' temporary files are removed by the next write; `check` says when it stops at its
 * depth limit; `annotate --structure` takes a pw.x XML as `analyze --structure` does; file-system errors are
 * sentences. Expectations are the requirements of the issue and SECURITY.md (no recalled values), except
 * where a physical value is named beside its source.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, utimesSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { fsErrorSentence } from '../../../src/cli/fsErrors';
import { removeStaleTemps, writeFileSafely } from '../../../src/cli/safeWrite';
import { checkRecordedPath, PathRefusedError, redactContent } from '../../../src/core/io/pathPolicy';
import { ValleyscopeError } from '../../../src/core/errors';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { eigenvalText, writeTinyRun } from '../annotations/tinyRun';
import { collinearModel } from '../../support/writers/roundTripModel';
import { writeBandsx, writeQeXml } from '../../support/writers/qe';
import { mkfifo, runCli } from './hostileSupport';

const base = mkdtempSync(join(tmpdir(), 'vs-policy-'));
after(() => rmSync(base, { recursive: true, force: true }));

function dir(name: string): string {
  const d = join(base, name);
  mkdirSync(d, { recursive: true });
  return d;
}

describe('the node file accessor', function () {
  this.timeout(20000);
  it('refuses a file above the limit it is asked to keep, before reading it', async () => {
    const d = dir('limit');
    writeFileSync(join(d, 'big'), 'x'.repeat(5000));
    await assert.rejects(
      nodeFileAccessor.readFile(join(d, 'big'), 4096),
      (e: unknown) => e instanceof ValleyscopeError && /above the limit/.test(e.message),
    );
    assert.equal((await nodeFileAccessor.readFile(join(d, 'big'), 5000)).length, 5000);
  });

  it('calls a FIFO, a device and a link to one "other", and refuses to read or open them, without blocking', async () => {
    const d = dir('kinds');
    const fifo = join(d, 'pipe');
    mkfifo(fifo);
    symlinkSync('/dev/zero', join(d, 'zero'));
    symlinkSync(fifo, join(d, 'pipe-link'));
    for (const p of [fifo, join(d, 'zero'), join(d, 'pipe-link')]) {
      const st = await nodeFileAccessor.stat(p);
      assert.equal(st?.type, 'other', p);
      assert.match(st.kind!, /FIFO|character device/);
      await assert.rejects(nodeFileAccessor.readFile(p), /only regular files are read/);
      await assert.rejects(nodeFileAccessor.readHead(p, 8192), /only regular files are read/);
      assert.throws(() => nodeFileAccessor.openRanged!(p), /only regular files are read/);
    }
  });

  it('lists links with the type of what they point to, marked as links', async () => {
    const d = dir('links');
    writeFileSync(join(d, 'real'), 'x');
    symlinkSync('real', join(d, 'to-file'));
    symlinkSync('/dev/zero', join(d, 'to-device'));
    symlinkSync('missing', join(d, 'dangling'));
    const list = (await nodeFileAccessor.list(d)).sort((a, b) => a.name.localeCompare(b.name));
    assert.deepEqual(list, [
      { name: 'real', type: 'file' },
      { name: 'to-device', type: 'other', link: true },
      { name: 'to-file', type: 'file', link: true },
    ]);
  });

  it('turns file-system failures into sentences (permission denied is not "EACCES: …")', () => {
    const raw = Object.assign(new Error("EACCES: permission denied, open '/srv/run/POSCAR'"), { code: 'EACCES' });
    assert.equal(fsErrorSentence('/srv/run/POSCAR', raw).message, '/srv/run/POSCAR could not be read: permission is denied');
    const loop = Object.assign(new Error('ELOOP'), { code: 'ELOOP' });
    assert.match(fsErrorSentence('a', loop, 'looked at').message, /^a could not be looked at: its symbolic links form a loop/);
  });
});

describe('the path policy for paths read from files', () => {
  const ok: [string, string][] = [
    ['POSCAR', 'POSCAR'],
    ['cell/POSCAR', 'cell/POSCAR'],
    ['./cell//POSCAR', 'cell/POSCAR'],
    ['cell\\POSCAR', 'cell/POSCAR'],
  ];
  for (const [value, normal] of ok) {
    it(`accepts ${JSON.stringify(value)} as ${normal}`, () => assert.equal(checkRecordedPath(value, 'f', 'h'), normal));
  }
  const refused: [string, RegExp][] = [
    ['', /is empty/],
    ['../POSCAR', /climbs out/],
    ['cell/../../POSCAR', /climbs out/],
    ['/etc/passwd', /absolute path/],
    ['C:\\x', /absolute path/],
    ['~/x', /absolute path/],
    ['.git/config', /hidden/],
    ['cell/.env', /hidden/],
    ['a\u0000b', /control characters/],
    ['a\nb', /control characters/],
    ['x'.repeat(2000), /longer than/],
  ];
  for (const [value, why] of refused) {
    it(`refuses ${JSON.stringify(value.slice(0, 20))}, naming the field`, () => {
      assert.throws(
        () => checkRecordedPath(value, 'settings.structureFile', 'run/EIGENVAL.valleys.json'),
        (e: unknown) =>
          e instanceof PathRefusedError &&
          /^settings\.structureFile in run\/EIGENVAL\.valleys\.json/.test(e.message) &&
          why.test(e.message) &&
          !/\n/.test(e.message),
      );
    });
  }
  it('removes quoted content from a reader sentence about a file the user did not name', () => {
    const s = redactContent('POSCAR:6:1: expected "Direct" or "Cartesian", found "TOKEN-123"; expected a number, found TOKEN-456');
    assert.ok(!s.includes('TOKEN'), s);
    assert.match(s, /^POSCAR:6:1: expected/);
  });
});

describe('smaller items', function () {
  this.timeout(30000);

  it('a binary KPOINTS gets a warning naming KPOINTS; the run is not taken as a mesh', async () => {
    const d = dir('binary-kpoints');
    writeTinyRun(d);
    const bytes = new Uint8Array(600);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 37 + 11) % 256;
    writeFileSync(join(d, 'KPOINTS'), bytes);
    const o = await runCli(['analyze', '--json', d]);
    assert.equal(o.code, 0, o.err);
    const r = JSON.parse(o.out) as { warnings: string[]; extrema: { kind: string; masses: { mass: number }[] }[] };
    assert.ok(
      r.warnings.some((w) => /KPOINTS.*not a text file/.test(w)),
      JSON.stringify(r.warnings),
    );
    // Still read as a path: the CBM keeps its mass (cosine tight-binding model, analytic m_c = 0.119 m_e with
    // t = 2 eV, a = 4 Å; tinyRun.ts; the coarse path reads it within a few per cent).
    const cbm = r.extrema.find((e) => e.kind === 'cbm');
    assert.ok(cbm && cbm.masses.length > 0 && Math.abs(cbm.masses[0]!.mass - 0.119) < 0.01, JSON.stringify(cbm?.masses));
  });

  it('a k-point coordinate of 1e300 (or NaN) is refused with a sentence, not printed as -Infinity ± NaN', async () => {
    for (const bad of ['0.1000000E+301', 'NaN']) {
      const d = dir(`absurd-k-${bad}`);
      writeTinyRun(d);
      const text = eigenvalText().split('\n');
      const at = text.findIndex((l, i) => i > 6 && l.trim().split(/\s+/).length === 4);
      const cols = text[at]!.trim().split(/\s+/);
      text[at] = `  ${bad}  ${cols[1]}  ${cols[2]}  ${cols[3]}`;
      writeFileSync(join(d, 'EIGENVAL'), text.join('\n'));
      const o = await runCli(['analyze', d]);
      assert.equal(o.code, 1, o.out + o.err);
      assert.match(o.err, /k-point 1 has a 1st coordinate|not a finite number/);
      assert.doesNotMatch(o.out + o.err, /Infinity|internal error/);
    }
  });

  it('a 230-character data file name can be annotated (the temporary name is short)', async () => {
    const d = dir('long-name');
    writeTinyRun(d);
    const name = `${'x'.repeat(222)}EIGENVAL`;
    assert.equal(name.length, 230);
    writeFileSync(join(d, name), readFileSync(join(d, 'EIGENVAL')));
    rmSync(join(d, 'EIGENVAL'));
    const o = await runCli(['annotate', join(d, name)]);
    assert.equal(o.code, 0, o.err);
    assert.ok(existsSync(join(d, `${name}.valleys.json`)));
  });

  it('the next write removes temporary files of killed writes, and keeps those that may be in use', async () => {
    const d = dir('stale-temps');
    // A pid that is certainly gone: a child that has exited.
    const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const deadPid = Number(gone.stdout);
    const old = (Date.now() - 10 * 60_000) / 1000;
    const names = {
      deadOld: `.vs-${deadPid.toString(36)}-0123abcd.tmp`,
      deadYoung: `.vs-${deadPid.toString(36)}-89abcdef.tmp`,
      liveOld: `.vs-${process.pid.toString(36)}-00000000.tmp`,
      olderForm: `.EIGENVAL.valleys.json.${deadPid}.deadbeef.tmp`,
      notOurs: '.vs-notours.tmp',
    };
    for (const n of Object.values(names)) writeFileSync(join(d, n), 'x'.repeat(1000));
    symlinkSync(join(d, names.deadOld), join(d, `.vs-${deadPid.toString(36)}-ffffffff.tmp`));
    for (const n of [names.deadOld, names.liveOld, names.olderForm, names.notOurs]) utimesSync(join(d, n), old, old);
    await writeFileSafely(join(d, 'EIGENVAL.valleys.json'), '{}\n');
    const left = new Set(readdirSync(d));
    assert.ok(!left.has(names.deadOld), 'a killed write of a process that is gone, ten minutes old: removed');
    assert.ok(!left.has(names.olderForm), 'the older temporary form: removed');
    assert.ok(left.has(names.deadYoung), 'younger than a minute: may be a write in progress elsewhere, kept');
    assert.ok(left.has(names.liveOld), 'of a live process: kept');
    assert.ok(left.has(names.notOurs), 'not our name: kept');
    assert.ok(left.has(`.vs-${deadPid.toString(36)}-ffffffff.tmp`), 'a link is never removed');
    assert.deepEqual(await removeStaleTemps(join(d, 'missing-folder')), []);
  });

  it('check says when it stops at its depth limit, in text and in the Markdown summary', async () => {
    const root = dir('deep');
    let d = root;
    for (let i = 0; i < 34; i++) d = join(d, `d${i}`);
    const eig = writeTinyRun(d);
    assert.equal((await runCli(['annotate', eig])).code, 0);
    const text = await runCli(['check', root]);
    assert.equal(text.code, 1);
    assert.match(text.err, /stopped 32 folders deep; 1 deeper folder was not searched/);
    const md = await runCli(['check', '--format', 'md', root]);
    assert.match(md.err + md.out, /stopped 32 folders deep/);
    // Named on the command line, the deep run is checked.
    assert.equal((await runCli(['check', d])).code, 0);
  });

  it('check follows no link to a folder, and says so', async () => {
    const root = dir('linked-folder');
    writeTinyRun(join(root, 'run'));
    assert.equal((await runCli(['annotate', join(root, 'run')])).code, 0);
    symlinkSync(join(root, 'run'), join(root, 'again'));
    const o = await runCli(['check', root]);
    assert.equal(o.code, 0, o.out + o.err);
    assert.match(o.err, /1 symbolic link to folders was not followed/);
    assert.match(o.out, /1 annotations file checked/);
  });

  it('annotate --structure takes a pw.x XML as analyze --structure does (and check reads it again)', async () => {
    const d = dir('qe-structure');
    const model = collinearModel();
    writeFileSync(join(d, 'bands.out'), writeBandsx(model, 4));
    mkdirSync(join(d, 'scf'));
    writeFileSync(join(d, 'scf', 'pw.xml'), writeQeXml(model, { alat: 4 }));
    const analyzed = await runCli(['analyze', '--json', join(d, 'bands.out'), '--structure', join(d, 'scf', 'pw.xml')]);
    assert.equal(analyzed.code, 0, analyzed.err);
    const annotated = await runCli(['annotate', join(d, 'bands.out'), '--structure', join(d, 'scf', 'pw.xml')]);
    assert.equal(annotated.code, 0, annotated.err);
    const doc = parseAnnotations(readFileSync(join(d, 'bands.out.valleys.json'), 'utf8'), 'x');
    assert.equal(doc.settings.structureFile, 'scf/pw.xml');
    assert.ok(doc.sources.some((x) => x.path === 'scf/pw.xml' && x.role === 'structure'));
    // Both read the cell and alat from the XML: neither warns that the k-points stay in 2π/alat units.
    const a = JSON.parse(analyzed.out) as { warnings: string[] };
    const noCell = /no --alat or --structure/;
    assert.ok(!a.warnings.some((w) => noCell.test(w)), JSON.stringify(a.warnings));
    assert.ok(!doc.warnings.some((w) => noCell.test(w)), JSON.stringify(doc.warnings));
    const without = await runCli(['analyze', '--json', join(d, 'bands.out')]);
    assert.ok(
      (JSON.parse(without.out) as { warnings: string[] }).warnings.some((w) => noCell.test(w)),
      'the warning exists without --structure',
    );
    assert.equal((await runCli(['check', d])).code, 0);
  });
});
