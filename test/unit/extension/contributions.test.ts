import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { LANGUAGE_IDS, languageForFormat, isEigenvalueLanguage } from '../../../src/extension/languageIds';
import { COMMANDS, BAND_VIEW_TYPE } from '../../../src/extension/commandIds';
import { READERS } from '../../../src/core/formats/index';

interface Pkg {
  activationEvents: string[];
  capabilities: { untrustedWorkspaces: { supported: string | boolean }; virtualWorkspaces: boolean };
  engines: { vscode: string };
  contributes: {
    languages: { id: string; filenames?: string[]; filenamePatterns?: string[]; extensions?: string[]; firstLine?: string }[];
    commands: { command: string; title: string; category: string }[];
    grammars: { path: string }[];
  };
}
const root = join(__dirname, '../../..');
const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as Pkg;
const hooks = readFileSync(join(root, 'test/editor/HOOKS.md'), 'utf8');

describe('extension: package.json contributions agree with the code and HOOKS.md', () => {
  it('contributes every language the code knows, each recognised by name or first line and activating the extension', () => {
    assert.deepEqual(pkg.contributes.languages.map((l) => l.id).sort(), [...LANGUAGE_IDS].sort());
    for (const l of pkg.contributes.languages) {
      assert.ok((l.filenames?.length ?? 0) + (l.filenamePatterns?.length ?? 0) + (l.extensions?.length ?? 0) > 0 || l.firstLine, l.id);
      assert.ok(pkg.activationEvents.includes(`onLanguage:${l.id}`), l.id);
      if (l.firstLine) assert.doesNotThrow(() => new RegExp(l.firstLine!));
    }
    assert.ok(pkg.activationEvents.includes('workspaceContains:**/*.valleys.json'));
    assert.ok(pkg.activationEvents.includes(`onWebviewPanel:${BAND_VIEW_TYPE}`));
  });

  it('no file-name pattern of an eigenvalue language claims an annotations file (EIGENVAL.valleys.json stays JSON)', () => {
    // VS Code's glob: '*' within a name, '?' one character; a simple translation is enough for these patterns.
    const globToRegExp = (g: string) =>
      new RegExp(
        `^${g
          .replace(/[.+^${}()|[\]\\]/g, '\\$&')
          .replace(/\*/g, '.*')
          .replace(/\?/g, '.')}$`,
      );
    for (const name of [
      'EIGENVAL.valleys.json',
      'vasprun.xml.valleys.json',
      'si_band.dat.valleys.json',
      'Si.bands.valleys.json',
      'x.bxsf.valleys.json',
    ]) {
      for (const l of pkg.contributes.languages) {
        for (const f of l.filenames ?? []) assert.notEqual(f, name, `${l.id} claims ${name}`);
        for (const g of l.filenamePatterns ?? []) assert.doesNotMatch(name, globToRegExp(g), `${l.id} pattern ${g} claims ${name}`);
        for (const e of l.extensions ?? []) assert.ok(!name.endsWith(e), `${l.id} extension ${e} claims ${name}`);
      }
    }
  });

  it("first-line patterns match the layouts they name (bands.x `&plot` header, CASTEP and BXSF headers; the codes' own layouts)", () => {
    const first = (id: string) => new RegExp(pkg.contributes.languages.find((l) => l.id === id)!.firstLine!);
    assert.match(' &plot nbnd=   8, nks=   400 /', first('qe-bands'));
    assert.match('Number of k-points    400', first('castep-bands'));
    assert.match(' BEGIN_INFO', first('bxsf'));
    assert.doesNotMatch('    2    2    1    1', first('castep-bands'));
  });

  it('maps every registered reader to one of the languages', () => {
    for (const r of READERS) assert.ok(languageForFormat(r.id) !== null, `${r.id} has no language`);
    const expected: Record<string, string> = {
      'vasp-eigenval': 'vasp-eigenval',
      'vasprun-xml': 'vasp-vasprun',
      'qe-xml': 'qe-xml',
      'qe-bands': 'qe-bands',
      'wannier90-band': 'wannier90-band',
      bxsf: 'bxsf',
      'castep-bands': 'castep-bands',
    };
    for (const [format, lang] of Object.entries(expected)) assert.equal(languageForFormat(format), lang, format);
    assert.equal(languageForFormat('unknown-format'), null);
    assert.equal(isEigenvalueLanguage('plaintext'), false);
  });

  it('contributes every band-view command id, titled "Valleyscope: …" in the palette, and HOOKS.md documents each', () => {
    const ids = pkg.contributes.commands.map((c) => c.command);
    for (const id of Object.values(COMMANDS)) assert.ok(ids.includes(id), `${id} is contributed`);
    for (const c of pkg.contributes.commands.filter((x) => (Object.values(COMMANDS) as string[]).includes(x.command))) {
      assert.equal(c.category, 'Valleyscope');
      assert.ok(hooks.includes(`\`${c.command}\` | Valleyscope: ${c.title} |`), `HOOKS.md row for ${c.command}`);
    }
  });

  it('runs limited in untrusted workspaces, in virtual workspaces, and on VS Code 1.100', () => {
    assert.equal(pkg.capabilities.untrustedWorkspaces.supported, 'limited');
    assert.equal(pkg.capabilities.virtualWorkspaces, true);
    assert.equal(pkg.engines.vscode, '^1.100.0');
  });

  it('ships the grammar files it names (kept in the package by .vscodeignore)', () => {
    const ignore = readFileSync(join(root, '.vscodeignore'), 'utf8');
    for (const g of pkg.contributes.grammars) {
      assert.doesNotThrow(() => JSON.parse(readFileSync(join(root, g.path), 'utf8')), g.path);
      assert.ok(ignore.includes(`!${g.path.replace(/^\.\//, '').split('/')[0]}/**`), `${g.path} is packaged`);
    }
  });
});
