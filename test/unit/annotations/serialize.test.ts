import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { formatNumber, type NumberStyle } from '../../../src/core/annotations/numberFormat';
import type { AnnotationsDoc } from '../../../src/core/annotations/annotationsModel';
import { loadRun } from '../../../src/core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { writeTinyRun } from './tinyRun';
import { analyticReport } from './analyticReport';
import { docArb, fuzzParams, fuzzTimeout } from './arbitraries';

const SOURCE = {
  format: 'vasp-eigenval',
  file: 'run/EIGENVAL',
  files: [{ role: 'eigenvalues', path: 'run/EIGENVAL', sha256: 'a'.repeat(64) }],
};

function analyticDoc(): AnnotationsDoc {
  return buildAnnotations(analyticReport(), SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
}

describe('annotations writer', function () {
  this.timeout(fuzzTimeout());
  let dir = '';
  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-ann-ser-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('rewrites a document read back from its own text byte for byte (a real analysis of a tiny VASP run)', async () => {
    const eig = writeTinyRun(join(dir, 'run'));
    const bs = await loadRun(nodeFileAccessor, eig);
    const doc = buildAnnotations(analyzeBandStructure(bs, DEFAULT_SETTINGS), bs.source, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
    const text = serializeAnnotations(doc);
    assert.equal(serializeAnnotations(doc), text);
    const again = serializeAnnotations(parseAnnotations(text, 'x.valleys.json'));
    assert.equal(again, text);
    // The gap of the cosine model is E_g = 1.5 eV, direct at Γ (analytic model, tinyRun.ts).
    assert.match(text, /"eV": 1\.5000,\n\s+"direct": true/);
    // Source paths are relative to the folder of the annotations file.
    assert.deepEqual(doc.sources.map((s) => s.path).sort(), ['EIGENVAL', 'KPOINTS', 'POSCAR']);
  });

  it('writes fixed digits per quantity: energies to 0.1 meV, masses to 4 significant digits, k to 6 decimals', () => {
    const text = serializeAnnotations(analyticDoc());
    // m_c = ħ²/(2 t a²) = 7.6199642 / (2·2·16) = 0.11906 m_e (analytic model; ħ²/m_e CODATA 2018).
    assert.match(text, /"mass": 0\.1191,/);
    // m_v = −ħ²/(2 t a²) with t = 1 eV: −0.23812 m_e (analytic model).
    assert.match(text, /"mass": -0\.2381,/);
    assert.match(text, /"energy_eV": 1\.5000,/);
    assert.match(text, /"k": \[0\.000000, 0\.000000, 0\.000000\],/);
    assert.match(text, /"residual_meV": 0\.01,/);
    assert.ok(text.endsWith('}\n') && !text.endsWith('\n\n'), 'one trailing newline');
    for (const line of text.split('\n')) {
      const indent = /^ */.exec(line)![0].length;
      assert.equal(indent % 2, 0, `two-space indent: ${JSON.stringify(line)}`);
      assert.ok(!line.includes('\t') && !line.endsWith(' '), `no tabs or trailing spaces: ${JSON.stringify(line)}`);
    }
  });

  it('writes no float noise and no negative zero', () => {
    const doc = analyticDoc();
    doc.entries[0]!.energy_eV = 0.1 + 0.2; // 0.30000000000000004 in binary floating point
    doc.entries[0]!.masses[0]!.mass = 0.1 + 0.2;
    doc.entries[0]!.k = [-0, 1e-9, -1e-9];
    const text = serializeAnnotations(doc);
    assert.ok(!text.includes('0000000000004'), 'float noise written');
    assert.ok(!/-0\.0+[,\]\n]/.test(text), 'negative zero written');
    assert.match(text, /"energy_eV": 0\.3000,/);
    assert.match(text, /"mass": 0\.3000,/);
  });

  it('gives a one-line diff when one mass changes', () => {
    const a = analyticDoc();
    const b = analyticDoc();
    b.entries.find((e) => e.kind === 'cbm')!.masses[0]!.mass! *= 1.05;
    const la = serializeAnnotations(a).split('\n');
    const lb = serializeAnnotations(b).split('\n');
    assert.equal(la.length, lb.length);
    const changed = la.filter((line, i) => line !== lb[i]);
    assert.deepEqual(changed, ['          "mass": 0.1191,']);
  });

  it('writes entries in the same order whatever order they come in', () => {
    fc.assert(
      fc.property(docArb, fc.infiniteStream(fc.nat()), (doc, rnd) => {
        const shuffled = {
          ...doc,
          entries: [...doc.entries]
            .map((e) => [rnd.next().value, e] as const)
            .sort((x, y) => x[0] - y[0])
            .map((x) => x[1]),
        };
        assert.equal(serializeAnnotations(shuffled), serializeAnnotations(doc));
      }),
      fuzzParams(100),
    );
  });

  it('is a fixed point: write, read, write gives the same bytes for any document', () => {
    fc.assert(
      fc.property(docArb, (doc) => {
        const text = serializeAnnotations(doc);
        const back = parseAnnotations(text, 'gen.valleys.json');
        assert.equal(serializeAnnotations(back), text);
        assert.equal(serializeAnnotations(parseAnnotations(serializeAnnotations(back), 'gen.valleys.json')), text);
      }),
      fuzzParams(150),
    );
  });

  it('formats every number style stably: formatting what it wrote gives the same text', () => {
    const styles: NumberStyle[] = ['energy', 'mass', 'k', 'unit', 'residual', 'meV', 'stderr', 'plain'];
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 }), fc.constantFrom(...styles), (x, style) => {
        const s = formatNumber(x, style);
        assert.ok(Number.isFinite(JSON.parse(s)), `valid JSON number: ${s}`);
        assert.equal(formatNumber(Number(s), style), s);
      }),
      fuzzParams(500),
    );
    // 4 significant digits, common practice for masses quoted in m_e.
    assert.equal(formatNumber(0.19123, 'mass'), '0.1912');
    assert.equal(formatNumber(9.99961, 'mass'), '10.00');
    assert.equal(formatNumber(-1.08, 'mass'), '-1.080');
    assert.equal(formatNumber(1234567, 'mass'), '1.235e+6');
    assert.equal(formatNumber(-0.00004, 'energy'), '0.0000');
  });
});
