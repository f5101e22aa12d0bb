import assert from 'node:assert/strict';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import { eigenvalHeader } from '../../support/unitEigenval';
import { capture } from '../../support/unitCliCapture';

// A direct-gap toy run in VASP 5 layout: 2 k-points, 4 bands, 4 electrons (2 filled bands, common practice).
const EIG = `${eigenvalHeader(4, 2, 4)}
  0.0000000E+00  0.0000000E+00  0.0000000E+00  0.5000000E+00
    1      -4.000000
    2      -1.000000
    3       0.500000
    4       2.000000

  0.5000000E+00  0.0000000E+00  0.0000000E+00  0.5000000E+00
    1      -4.500000
    2      -1.500000
    3       1.000000
    4       2.500000
`;

describe('valleyscope analyze', () => {
  const dir = mkdtempSync(join(tmpdir(), 'vs-cli-'));
  const file = join(dir, 'EIGENVAL');
  writeFileSync(file, EIG);

  it('prints exactly one JSON object with the contract keys', async () => {
    const io = capture();
    const code = await main(['analyze', file, '--json'], io);
    assert.equal(code, 0, io.stderr);
    const lines = io.stdout.trim().split('\n');
    assert.equal(lines.length, 1);
    const j = JSON.parse(lines[0]!);
    for (const key of ['file', 'format', 'nk', 'nbands', 'nspin', 'electrons', 'metal', 'gap', 'extrema']) assert.ok(key in j, key);
    assert.equal(j.nk, 2);
    assert.equal(j.nbands, 4);
    assert.equal(j.metal, false);
    // Hand count: VBM −1.0 (band 2, Γ), CBM 0.5 (band 3, Γ): 1.5 eV direct.
    assert.equal(j.gap.eV, 1.5);
    assert.equal(j.gap.direct, true);
    assert.deepEqual(Object.keys(j.gap.vbm), ['band', 'spin', 'k', 'eV', 'label']);
    assert.equal(j.gap.vbm.band, 2);
    assert.equal(j.gap.cbm.band, 3);
    assert.deepEqual(j.gap.directGap, { eV: 1.5, k: [0, 0, 0] });
  });

  it('prints a readable summary by default, with the gap caution', async () => {
    const io = capture();
    assert.equal(await main(['analyze', file], io), 0);
    assert.match(io.stdout, /Band gap 1\.5000 eV, direct/);
    assert.match(io.stdout, /underestimates band gaps/);
  });

  it('bad input: non-zero exit, one sentence naming file and line, no stack trace', async () => {
    const bad = join(dir, 'EIGENVAL.bad');
    writeFileSync(bad, EIG.replace('2.500000', '********'));
    const io = capture();
    const code = await main(['analyze', bad], io);
    assert.notEqual(code, 0);
    const lines = io.stderr.trim().split('\n');
    assert.equal(lines.length, 1);
    assert.match(lines[0]!, /EIGENVAL\.bad:18:13: .*overflowed/);
    assert.doesNotMatch(io.stderr, /\n\s+at /);
  });

  it('usage errors name the option', async () => {
    const io = capture();
    assert.equal(await main(['analyze', file, '--window', 'wide'], io), 2);
    assert.match(io.stderr, /--window must be a positive number of meV/);
    const io2 = capture();
    assert.equal(await main(['analyse-this'], io2), 2);
    assert.match(io2.stderr, /unknown command/);
  });
});
