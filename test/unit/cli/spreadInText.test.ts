/**
 * The text report quotes a finite-difference mass with its spread against the parabola fit on the same samples
 * as the ±, and names it so; its stderr (the rounding alone) is given beside it. Model: the one-band
 * tight-binding cosine band of tinyRun.ts (a published analytic model; not a parabola away from Γ, so the two
 * methods disagree by a measurable amount).
 */
import assert from 'node:assert/strict';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { capture } from '../../support/unitCliCapture';
import { writeTinyRun } from '../annotations/tinyRun';

interface JsonMass {
  towards: string;
  mass: number;
  stderr: number;
  methodSpread?: { against: string; mass: number; window_meV: number; spread: number };
}

describe('text report: the spread of a finite difference is its quoted uncertainty', function () {
  this.timeout(30000);
  before(() => ensureSymmetryReady());

  it('central-2: ± is the spread against the parabola, named, with the rounding stderr beside it; parabola: no such words', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'vs-spread-')), 'run');
    writeTinyRun(dir, { gap_eV: 1.2 });
    const json = capture();
    assert.equal(await main(['analyze', dir, '--method', 'central-2', '--window', '300', '--json'], json), 0, json.stderr);
    const r = JSON.parse(json.stdout) as { extrema: { kind: string; masses: JsonMass[] }[] };
    const m = r.extrema.find((e) => e.kind === 'cbm')!.masses[0]!;
    assert.ok(m.methodSpread, 'a finite-difference mass carries its spread');
    assert.ok(m.methodSpread.spread > m.stderr, `spread ${m.methodSpread.spread} vs stderr ${m.stderr}`);
    const text = capture();
    assert.equal(await main(['analyze', dir, '--method', 'central-2', '--window', '300'], text), 0, text.stderr);
    const line = text.stdout.split('\n').find((l) => l.includes(`towards ${m.towards}`) && l.includes(m.mass.toFixed(3)));
    assert.ok(line, text.stdout);
    const quoted = Number(/m\* = \S+ ± ([\d.]+) m_e/.exec(line)?.[1]);
    // The ± is printed to 0.001 m_e; the JSON keeps three significant digits.
    assert.ok(Math.abs(quoted - m.methodSpread.spread) <= 0.0006, `${quoted} vs ${m.methodSpread.spread}: ${line}`);
    assert.match(line, /± is the spread against the parabola fit at the same window \(rounding alone ± [\d.e-]+\)/);
    const plain = capture();
    assert.equal(await main(['analyze', dir, '--method', 'parabola'], plain), 0, plain.stderr);
    assert.doesNotMatch(plain.stdout, /spread against/);
  });
});
