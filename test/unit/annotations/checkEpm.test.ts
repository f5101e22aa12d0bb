/**
 * annotate and check on a realistic run: silicon from the empirical pseudopotential model of Cohen &
 * Bergstresser (Phys. Rev. 141, 789 (1966)) in VASP layout (fixtures/epm/si, see its README).
 */
import { strict as assert } from 'node:assert';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { cli } from './runCli';

/** Add `shift` eV to band `band` (1-based) at k-point `k` (0-based) of an EIGENVAL text. */
function shiftEigenvalue(text: string, k: number, band: number, shift: number): string {
  const lines = text.split('\n');
  let kp = -1;
  for (let i = 6; i < lines.length; i++) {
    const t = lines[i]!.trim().split(/\s+/);
    if (t.length === 4) kp++;
    else if (kp === k && t.length === 3 && Number(t[0]) === band) {
      const e = Number(t[1]) + shift;
      lines[i] = lines[i]!.replace(t[1]!, e.toFixed(6));
      return lines.join('\n');
    }
  }
  throw new Error(`band ${band} of k-point ${k} not found`);
}

describe('annotate and check on the EPM silicon run', function () {
  this.timeout(60000);
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'vs-epm-'));
    cpSync('fixtures/epm/si', join(dir, 'si'), { recursive: true });
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('finds the conduction minimum near 0.85 of Γ–X, checks clean, and names the entry after a 50 meV change', async () => {
    const eig = join(dir, 'si', 'EIGENVAL');
    assert.equal((await cli('annotate', eig)).code, 0);
    const doc = parseAnnotations(readFileSync(`${eig}.valleys.json`, 'utf8'), 'si');
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    // Si conduction minimum at about 85 % of Γ–X (physics.md; the model's README: 0.85). X = (1/2, 0, 1/2) in
    // fcc reciprocal fractional coordinates.
    assert.ok(Math.abs(cbm.k[0] / 0.5 - 0.85) < 0.02 && cbm.k[1] === 0 && cbm.k[0] === cbm.k[2], `CBM at ${cbm.k}`);
    // Indirect gap ≈ 0.82 eV for this model (fixtures/epm/README.md; Cohen & Bergstresser's model, no spin-orbit).
    assert.ok(doc.gap && !doc.gap.direct && Math.abs(doc.gap.eV - 0.82) < 0.03, `gap ${doc.gap?.eV}`);
    assert.equal((await cli('check', dir)).code, 0);

    // k-point 34 of the first segment (Γ–X, 40 points) is the sampled point nearest 0.85 of Γ–X:
    // raise band 5 there by 50 meV.
    const kNearest = Math.round(0.85 * 39);
    writeFileSync(eig, shiftEigenvalue(readFileSync(eig, 'utf8'), kNearest, 5, 0.05));
    const r = await cli('check', dir);
    assert.equal(r.code, 1);
    assert.match(r.out, /stale:\s+source EIGENVAL \(eigenvalues\) has changed/);
    const lines = r.out.split('\n').filter((l) => l.includes('drifted: cbm/e1/'));
    assert.ok(lines.length > 0, r.out);
    assert.ok(
      lines.some((l) => /(energy|mass towards|k) .* → /.test(l)),
      lines.join('\n'),
    );
  });
});
