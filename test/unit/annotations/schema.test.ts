import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020';
import addFormats from 'ajv-formats';
import fc from 'fast-check';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { mergeAnnotations } from '../../../src/core/annotations/mergeAnnotations';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { main } from '../../../src/cli/main';
import { analyticReport } from './analyticReport';
import { docArb, fuzzParams, fuzzTimeout } from './arbitraries';
import { writeTinyRun } from './tinyRun';

// The schema is checked with a general-purpose JSON Schema 2020-12 validator from the registry (ajv).
const schema = JSON.parse(readFileSync('schema/valleys.schema.json', 'utf8')) as object;
const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
addFormats(ajv);
const validate = ajv.compile(schema);

function assertValid(text: string): void {
  const ok = validate(JSON.parse(text));
  assert.ok(ok, `schema errors: ${ajv.errorsText(validate.errors)}\n${text.slice(0, 400)}`);
}

describe('annotations JSON Schema', function () {
  this.timeout(fuzzTimeout());
  it('is contributed to VS Code for *.valleys.json files', () => {
    const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as {
      contributes?: { jsonValidation?: { fileMatch: string; url: string }[] };
    };
    const entry = pkg.contributes?.jsonValidation?.find((j) => j.fileMatch === '*.valleys.json');
    assert.ok(entry, 'jsonValidation entry');
    assert.equal(entry.url, './schema/valleys.schema.json');
    assert.equal((schema as { $schema: string }).$schema, 'https://json-schema.org/draft/2020-12/schema');
  });

  it('validates what annotate writes for a real run, and after merges', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'vs-schema-'));
    try {
      const eig = writeTinyRun(join(dir, 'run'));
      const quiet = { out: () => undefined, err: () => undefined };
      assert.equal(await main(['annotate', eig], quiet), 0);
      assertValid(readFileSync(`${eig}.valleys.json`, 'utf8'));
      writeTinyRun(join(dir, 'run'), { shift: [0, 2, -0.05] });
      assert.equal(await main(['annotate', eig], quiet), 0);
      assertValid(readFileSync(`${eig}.valleys.json`, 'utf8'));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    const src = { format: 'vasp-eigenval', file: 'EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: 'd'.repeat(64) }] };
    const doc = buildAnnotations(analyticReport(), src, DEFAULT_SETTINGS, { toolVersion: '0.1.0' });
    assertValid(serializeAnnotations(doc));
    const noEdges = analyticReport();
    noEdges.extrema = [];
    assertValid(serializeAnnotations(mergeAnnotations(doc, buildAnnotations(noEdges, src, DEFAULT_SETTINGS, { toolVersion: '0.1.0' }))));
  });

  it('validates every document the writer makes (generated documents)', () => {
    fc.assert(
      fc.property(docArb, (doc) => {
        const text = serializeAnnotations(doc);
        assertValid(text);
        assertValid(serializeAnnotations(parseAnnotations(text, 'gen')));
      }),
      fuzzParams(100),
    );
  });

  it('rejects what the reader rejects in known fields', () => {
    const src = { format: 'vasp-eigenval', file: 'EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: 'e'.repeat(64) }] };
    const good = serializeAnnotations(buildAnnotations(analyticReport(), src, DEFAULT_SETTINGS, { toolVersion: '0.1.0' }));
    const bad = [
      good.replace('"band": 2,\n      "k"', '"band": 0,\n      "k"'),
      good.replace('"kind": "cbm"', '"kind": "bottom"'),
      good.replace('e'.repeat(64), 'E'.repeat(64)),
      good.replace('"valleyscopeAnnotations": 2', '"valleyscopeAnnotations": 3'),
      good.replace(
        /"k": \[0\.000000, 0\.000000, 0\.000000\],\n {6}"label": "Γ",\n {6}"energy_eV": 1\.5/,
        '"k": [0, 0],\n      "label": "Γ",\n      "energy_eV": 1.5',
      ),
      good.replace('"found": true', '"found": "yes"'),
    ];
    for (const text of bad) {
      assert.notEqual(text, good, 'the mutation applied');
      assert.equal(validate(JSON.parse(text)), false, text.slice(0, 200));
      assert.throws(() => parseAnnotations(text, 'bad'));
    }
  });
});
