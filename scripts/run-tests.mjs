#!/usr/bin/env node
// Runs the test suites that can run on this machine (unit, property, corpus, webview in headless Chromium)
// with mocha, and ends with one line "N passed, N failed" for CI.
// Before the webview suite it checks for the system browser (Debian's chromium) and installs it when it can
// (as root), or says in one sentence which command to run (see browserCheck.mjs); the suite then counts as
// failed, never as silently skipped.
// Usage: node scripts/run-tests.mjs [unit|webview|all] [extra mocha args...]
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureBrowser, realMachine } from './browserCheck.mjs';

const which = process.argv[2] && !process.argv[2].startsWith('-') ? process.argv[2] : 'all';
const extra = process.argv.slice(which === process.argv[2] ? 3 : 2);
const suites = which === 'all' ? ['unit', 'webview'] : [which];
mkdirSync('test-artifacts', { recursive: true });
// The suites write their scratch runs under one folder of their own, removed at the end, so a run of the
// tests leaves nothing behind in the machine's temporary folder (tests take tmpdir(), which reads TMPDIR).
const scratch = mkdtempSync(join(tmpdir(), 'valleyscope-tests-'));
process.on('exit', () => rmSync(scratch, { recursive: true, force: true }));
let passed = 0;
let failed = 0;
let pending = 0;
let code = 0;
for (const suite of suites) {
  const dir = join('test', suite);
  if (!existsSync(dir)) {
    console.error(`test suite folder ${dir} is missing`);
    failed++;
    code = 1;
    continue;
  }
  if (suite === 'webview' && !ensureBrowser(realMachine).ok) {
    console.error('webview suite not run: the browser it needs is missing (see the sentence above).');
    failed++;
    code = 1;
    continue;
  }
  const statsFile = join('test-artifacts', `mocha-${suite}.json`);
  rmSync(statsFile, { force: true });
  console.log(`\n=== ${suite} tests ===`);
  const r = spawnSync(
    process.execPath,
    [
      'node_modules/mocha/bin/mocha.js',
      '--recursive',
      `${dir}/**/*.test.ts`,
      '--reporter',
      'test/support/summaryReporter.cjs',
      '--reporter-option',
      `statsFile=${statsFile}`,
      ...extra,
    ],
    { stdio: 'inherit', env: { ...process.env, TMPDIR: scratch } },
  );
  if (r.status !== 0) code = 1;
  if (existsSync(statsFile)) {
    const s = JSON.parse(readFileSync(statsFile, 'utf8'));
    passed += s.passes;
    failed += s.failures;
    pending += s.pending;
    if (s.tests === 0) {
      console.error(`suite ${suite} ran no test`);
      code = 1;
    }
  } else {
    console.error(`suite ${suite} did not report its results`);
    failed++;
    code = 1;
  }
}
if (pending > 0) console.log(`(${pending} pending)`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(code || (failed > 0 ? 1 : 0));
