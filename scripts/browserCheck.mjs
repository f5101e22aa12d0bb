// The webview tests drive Debian's Chromium (/usr/bin/chromium) with playwright-core. Before they run,
// `npm test` checks that the browser is there; when it is not, it installs it when it can (as root, through
// scripts/install-test-deps.sh) and otherwise says in one sentence what to run. Pure decision logic with the
// machine passed in, so a test can play a machine without the browser.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export const BROWSER_PATH = '/usr/bin/chromium';
export const INSTALL_COMMAND = 'sudo bash scripts/install-test-deps.sh';
/** Flags that let that Chromium run headless on these machines (tests, editor tests and the view benchmark). */
export const BROWSER_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** The sentence printed when the browser is missing and cannot be installed from here. */
export function missingBrowserSentence(path = BROWSER_PATH) {
  return `The webview tests need Debian's Chromium at ${path}, which is not installed and cannot be installed without root: run "${INSTALL_COMMAND}" (it installs the chromium package), then "npm test" again.`;
}

/**
 * machine: { exists(path) -> boolean, isRoot() -> boolean, install() -> number (exit code), log(text) }.
 * Returns { ok, installed, sentence }: ok when the browser is there (before or after installing).
 */
export function ensureBrowser(machine, path = BROWSER_PATH) {
  if (machine.exists(path)) return { ok: true, installed: false, sentence: null };
  if (machine.isRoot()) {
    machine.log(`${path} is missing: installing Debian's chromium for the webview tests (scripts/install-test-deps.sh) ...`);
    const code = machine.install();
    if (code === 0 && machine.exists(path)) return { ok: true, installed: true, sentence: null };
    const sentence = `Installing chromium for the webview tests failed (scripts/install-test-deps.sh exited with ${code}); run "bash scripts/install-test-deps.sh" as root to see why, then "npm test" again.`;
    machine.log(sentence);
    return { ok: false, installed: false, sentence };
  }
  const sentence = missingBrowserSentence(path);
  machine.log(sentence);
  return { ok: false, installed: false, sentence };
}

/** This machine. */
export const realMachine = {
  exists: (p) => existsSync(p),
  isRoot: () => typeof process.getuid === 'function' && process.getuid() === 0,
  install: () => spawnSync('bash', ['scripts/install-test-deps.sh'], { stdio: 'inherit' }).status ?? 1,
  log: (t) => console.error(t),
};
