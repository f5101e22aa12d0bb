import { strict as assert } from 'node:assert';
import { annotationsMarkdown } from '../../../src/core/annotations/annotationsMarkdown';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { checkAnnotations } from '../../../src/core/annotations/checkAnnotations';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { analyticReport } from './analyticReport';

const SOURCE = { format: 'vasp-eigenval', file: 'EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: 'f'.repeat(64) }] };

describe('annotations Markdown summary', () => {
  it('gives the gap, one row per extremum with masses and review state, and keeps notes from breaking the table', () => {
    const doc = buildAnnotations(analyticReport(), SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
    const cbm = doc.entries.find((e) => e.kind === 'cbm')!;
    cbm.note = 'light | as expected\nsee *run 2*';
    cbm.status = 'accepted';
    const md = annotationsMarkdown(doc, 'run/EIGENVAL.valleys.json');
    // E_g = 1.5 eV, direct at Γ (analytic model of tinyRun.ts).
    assert.match(md, /\*\*Gap:\*\* 1\.5000 eV, direct \(VBM band 1 at Γ, CBM band 2 at Γ\)/);
    const row = md.split('\n').find((l) => l.startsWith('| CBM'))!;
    // m_c = ħ²/(2 t a²) = 0.1191 m_e (analytic model, CODATA 2018 ħ²/m_e).
    assert.match(
      row,
      /\| 1\.5000 \| 0\.1191 towards X \(parabola, 7 pts, 25\.00 meV\) \| 1 \| 0\.1191 \| 0\.1191 \| accepted \| light \\\| as expected see \\\*run 2\\\* \|$/,
    );
    assert.equal(row.split(/(?<!\\)\|/).length - 2, 8, 'eight cells');
    assert.match(md, /Review: 1 unreviewed, 1 accepted\./);
    assert.match(md, /Cautions:\n- Semilocal DFT/);
  });

  it('lists what a check found', () => {
    const doc = buildAnnotations(analyticReport(), SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
    const r = analyticReport();
    r.extrema.find((e) => e.kind === 'cbm')!.eV += 0.05;
    const result = checkAnnotations(doc, [{ path: 'EIGENVAL', sha256: '0'.repeat(64) }], r);
    assert.equal(result.ok, false);
    const md = annotationsMarkdown(doc, 'EIGENVAL.valleys.json', result);
    assert.match(md, /— \*\*needs attention\*\*/);
    assert.match(md, /\*\*Stale\*\*[^\n]*\n- source EIGENVAL \(eigenvalues\) has changed/);
    assert.match(md, /\*\*Drifted\*\*[^\n]*\n- cbm\/e1\/v=0,0,0 .*energy 1\.5000 eV → 1\.5500 eV \(\+50\.0 meV; tolerance 1 meV\)/);
  });
});
