import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadRun, readFromBytes, STREAM_READ_ABOVE_BYTES } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { vaspEigenvalReader } from '../../../src/core/formats/vasp/eigenval';

// A file above the streaming size is read in pieces by the CLI (load.ts); the result must equal the whole-file read.
// Bands: a cosine tight-binding model (common practice for test bands); the digest: node's OpenSSL SHA-256.
describe('a run file above the streaming size reads as the whole file does', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'vs-stream-'));
    const nb = 8;
    const lines = ['       2       2       1       1', '  0.4E+02  0.3E-09  0.3E-09  0.3E-09  0.5E-15', '  1.0E-004', '  CAR ', ' model'];
    const body: string[] = [];
    let nk = 0;
    while (nk * (nb * 32 + 70) < STREAM_READ_ABOVE_BYTES * 1.3) {
      const x = nk / 1000;
      body.push('', `  ${x.toFixed(7)}E+00  0.0000000E+00  0.0000000E+00  0.1000000E+00`);
      for (let b = 0; b < nb; b++) {
        const e = -5 + 2 * b - 0.5 * Math.cos(2 * Math.PI * x + b);
        body.push(`${String(b + 1).padStart(5)}    ${e.toFixed(6).padStart(11)}   ${(b < 4 ? 1 : 0).toFixed(6)}`);
      }
      nk++;
    }
    lines.push(`     8     ${nk}     ${nb}`);
    writeFileSync(join(dir, 'EIGENVAL'), `${lines.concat(body).join('\n')}\n`);
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('gives the same energies, k-points and file hash', async () => {
    const path = join(dir, 'EIGENVAL');
    const bytes = new Uint8Array(readFileSync(path));
    assert.ok(bytes.length > STREAM_READ_ABOVE_BYTES, 'the test file must be above the streaming size');
    const streamed = await loadRun(nodeFileAccessor, path);
    const whole = await readFromBytes(vaspEigenvalReader, { path, bytes }, []);
    assert.deepEqual(Array.from(streamed.energies[0]!), Array.from(whole.energies[0]!));
    assert.deepEqual(Array.from(streamed.kpoints), Array.from(whole.kpoints));
    assert.equal(streamed.source.files[0]!.sha256, createHash('sha256').update(bytes).digest('hex'));
    assert.equal(whole.source.files[0]!.sha256, streamed.source.files[0]!.sha256);
  });
});
