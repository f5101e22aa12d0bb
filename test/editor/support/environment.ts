/**
 * What scripts/run-editor-tests.mjs hands to the scenario tests through the environment. A missing value
 * means the editor could not be prepared: every scenario then fails with the reason (never skips).
 */
import { resolve } from 'node:path';

export interface EditorTestEnvironment {
  /** code-server's entry script (run with this Node). */
  codeServerEntry: string;
  /** The extensions folder the packaged .vsix was installed into (throw-away). */
  extensionsDir: string;
  /** A folder of this run for user-data folders, workspaces and process-group ids. */
  runDir: string;
  /** Where screenshots go. */
  artifactsDir: string;
  /** The repository root (for the built CLI and the fixtures). */
  repoRoot: string;
}

const repoRoot = resolve(__dirname, '..', '..', '..');

/** The environment, or throws the sentence that says why the editor is not available. */
export function editorTestEnvironment(): EditorTestEnvironment {
  const unavailable = process.env.VALLEYSCOPE_EDITOR_UNAVAILABLE;
  if (unavailable) throw new Error(`the editor could not be prepared: ${unavailable}`);
  const need = (name: string): string => {
    const v = process.env[name];
    if (!v) {
      throw new Error(`${name} is not set: run the editor tests with "npm run test:editor", which prepares the editor`);
    }
    return v;
  };
  return {
    codeServerEntry: need('VALLEYSCOPE_CODE_SERVER_ENTRY'),
    extensionsDir: need('VALLEYSCOPE_EXTENSIONS_DIR'),
    runDir: need('VALLEYSCOPE_EDITOR_RUN_DIR'),
    artifactsDir: process.env.VALLEYSCOPE_EDITOR_ARTIFACTS ?? resolve(repoRoot, 'test-artifacts', 'editor'),
    repoRoot,
  };
}
