// Lint configuration (ESLint flat config + typescript-eslint). `npm run lint` runs it; `npm test` runs lint first.
// Layer rules (DEVELOPERS.md, "Layout"): src/core is pure (no `vscode`, no node built-ins, nothing from the
// extension, the CLI or the webviews); the webviews import only src/protocol/ and the core.
import { builtinModules } from 'node:module';
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import prettierOff from 'eslint-config-prettier';

/** Every node built-in, bare and with the `node:` prefix. */
const nodeBuiltins = builtinModules.filter((m) => !m.startsWith('_'));
const nodeImports = [
  {
    name: 'vscode',
    message: 'src/core and the webviews do not import vscode: the extension adapts the core to the editor.',
  },
  ...nodeBuiltins.map((name) => ({
    name,
    message: 'Node built-ins are for src/cli and src/extension; the core and the webviews run in browsers too.',
  })),
];
const nodePatterns = {
  group: ['node:*'],
  message: 'Node built-ins are for src/cli and src/extension; the core and the webviews run in browsers too.',
};

/**
 * A layer of the tree (files) that imports neither vscode nor node built-ins nor any relative path matching
 * `forbidden` (a regular expression over the import string).
 */
function layerRule(files, forbidden, message) {
  return {
    files: [files],
    rules: {
      'no-restricted-imports': ['error', { paths: nodeImports, patterns: [nodePatterns, { regex: forbidden, message }] }],
    },
  };
}

/** One spelling for names: analyze (the CLI verb), never analyse (`analysis`, the noun, is fine). */
const oneSpelling = { regex: '[Aa]nalys(e|ing)', match: false };

export default tseslint.config(
  {
    ignores: [
      'node_modules/**',
      'dist/**',
      'out/**',
      'test-artifacts/**',
      'bench-data/**',
      '.editor-build/**',
      '.vscode-test/**',
      'fixtures/**',
      'media/**',
      'schema/**',
    ],
  },
  {
    files: ['**/*.ts', '**/*.mts'],
    extends: [js.configs.recommended, ...tseslint.configs.recommendedTypeChecked],
    languageOptions: {
      parserOptions: {
        projectService: true,
        tsconfigRootDir: import.meta.dirname,
      },
    },
    rules: {
      // TypeScript checks names itself (strict mode); the core rule does not know DOM/node globals by type.
      'no-undef': 'off',
      // An async method may implement a Promise-returning contract without awaiting anything.
      '@typescript-eslint/require-await': 'off',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'separate-type-imports', disallowTypeAnnotations: false }],
      '@typescript-eslint/naming-convention': [
        'error',
        // Types, interfaces, classes, enums: PascalCase.
        { selector: 'typeLike', format: ['PascalCase'], custom: oneSpelling },
        { selector: 'function', format: ['camelCase'], custom: oneSpelling },
        // A quantity with its unit keeps the unit's own spelling after one underscore: window_meV, fermi_eV.
        {
          selector: ['variable', 'parameter'],
          filter: { regex: '^[a-z][A-Za-z0-9]*_[A-Za-z0-9]+$', match: true },
          format: null,
          custom: oneSpelling,
        },
        // Variables: camelCase, UPPER_CASE for module constants, PascalCase for namespaces and single-letter
        // matrices (M, Q); a leading underscore marks an unused one.
        {
          selector: 'variable',
          format: ['camelCase', 'UPPER_CASE', 'PascalCase'],
          leadingUnderscore: 'allow',
          custom: oneSpelling,
        },
        { selector: 'parameter', format: ['camelCase', 'PascalCase'], leadingUnderscore: 'allow', custom: oneSpelling },
      ],
    },
  },
  {
    // Scripts and tests run under node/tsx; typed array and JSON plumbing there is looser by nature.
    files: ['test/**/*.ts', 'scripts/**/*.ts', 'scripts/**/*.mts'],
    rules: {
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      // Messages of assertions print k-points and vectors as their comma-joined elements.
      '@typescript-eslint/restrict-template-expressions': ['error', { allowNumber: true, allowArray: true }],
      // Browser-side results (page.evaluate) are typed by an assertion; the rule asks for type arguments instead.
      '@typescript-eslint/no-unnecessary-type-assertion': 'off',
    },
  },
  {
    files: ['**/*.mjs', '**/*.cjs'],
    extends: [js.configs.recommended],
    languageOptions: { sourceType: 'module', ecmaVersion: 2022 },
    rules: { 'no-undef': 'off', 'no-unused-vars': ['error', { argsIgnorePattern: '^_', caughtErrors: 'none' }] },
  },
  {
    files: ['**/*.cjs'],
    languageOptions: { sourceType: 'commonjs' },
  },
  // Layer rule: the core is pure.
  layerRule(
    'src/core/**/*.ts',
    String.raw`^(\.\./)+(extension|cli|protocol)(/|$)|(^|/)webview(/|$)`,
    'src/core imports nothing from src/extension, src/cli, src/protocol/ or webview/.',
  ),
  // Layer rule: the webviews import only src/protocol/ and the core's pure modules.
  layerRule(
    'webview/**/*.ts',
    String.raw`^(\.\./)+src/(?!protocol(/|$)|core/)`,
    'The webviews import only src/protocol/ and modules of src/core.',
  ),
  // Formatting is Prettier's (`prettier --check` in `npm run lint`): turn off the lint rules it owns.
  prettierOff,
);
