/**
 * The layer rules of eslint.config.mjs (DEVELOPERS.md, "Layout") catch a violation: scratch files with a
 * deliberate forbidden import are written into src/core and webview/, linted with the project's own
 * configuration, and must fail with `no-restricted-imports`; clean scratch files beside them (controls) must
 * pass, so the check cannot pass by linting nothing.
 */
import { strict as assert } from 'node:assert';
import { rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { ESLint } from 'eslint';

const root = resolve(__dirname, '../../..');

interface Scratch {
  /** Folder of the scratch file, relative to the repository root. */
  dir: string;
  source: string;
  /** Whether the layer rule must refuse it. */
  violates: boolean;
}

const scratches: Scratch[] = [
  { dir: 'src/core', source: "import * as vscode from 'vscode';\nexport const v: unknown = vscode;\n", violates: true },
  { dir: 'src/core', source: "import { readFileSync } from 'node:fs';\nexport const r: unknown = readFileSync;\n", violates: true },
  { dir: 'src/core', source: "import { join } from 'path';\nexport const j: unknown = join;\n", violates: true },
  { dir: 'src/core/analysis', source: "import type { CliIO } from '../../cli/io';\nexport type T = CliIO;\n", violates: true },
  { dir: 'src/core', source: "export { activate } from '../extension/extension';\n", violates: true },
  { dir: 'src/core', source: "import type { ArrayDType } from '../protocol';\nexport type T = ArrayDType;\n", violates: true },
  {
    dir: 'webview/bandView',
    source: "import { LANGUAGE_IDS } from '../../src/extension/languageIds';\nexport const l: unknown = LANGUAGE_IDS;\n",
    violates: true,
  },
  { dir: 'webview/bandView', source: "import { join } from 'node:path';\nexport const j: unknown = join;\n", violates: true },
  // Controls: what the layers allow.
  { dir: 'src/core', source: "import { HARTREE_EV } from './units';\nexport const h: number = HARTREE_EV;\n", violates: false },
  {
    dir: 'webview/bandView',
    source: "import type { ArrayDType } from '../../src/protocol';\nexport type T = ArrayDType;\n",
    violates: false,
  },
  {
    dir: 'webview/bandView',
    source: "import { HARTREE_EV } from '../../src/core/units';\nexport const h: number = HARTREE_EV;\n",
    violates: false,
  },
];

describe('lint: layer rules', function () {
  this.timeout(180_000);
  const files: string[] = [];
  after(() => {
    for (const f of files) rmSync(f, { force: true });
  });

  it('refuses forbidden imports in src/core and webview/ and accepts the allowed ones', async () => {
    scratches.forEach((s, i) => {
      const f = join(root, s.dir, `lintScratch${process.pid}n${i}.ts`);
      writeFileSync(f, s.source);
      files.push(f);
    });
    const eslint = new ESLint({ cwd: root });
    const results = await eslint.lintFiles(files);
    assert.equal(results.length, scratches.length, 'every scratch file was linted');
    results.forEach((r, i) => {
      const s = scratches[i]!;
      const layer = r.messages.filter((m) => m.ruleId === 'no-restricted-imports');
      const fatal = r.messages.filter((m) => m.fatal === true);
      assert.deepEqual(fatal, [], `${s.dir}: the scratch file parses`);
      if (s.violates) assert.ok(layer.length > 0, `${s.dir}: layer violation not reported for:\n${s.source}`);
      else assert.deepEqual(r.messages, [], `${s.dir}: the allowed import is accepted:\n${s.source}`);
    });
  });
});
