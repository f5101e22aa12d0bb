#!/usr/bin/env node
// Runs the scenario tests in a real VS Code (code-server 4.100.3 driven from Debian's Chromium):
//   1. test/editor/install-editor.sh (once per machine: Debian packages, node-gyp, code-server in a cache
//      folder outside the project);
//   2. `npm run package` (the .vsix users install) and its installation into a throw-away extensions folder;
//   3. mocha over test/editor/**/*.test.ts; each scenario group starts code-server on 127.0.0.1 in its own
//      process group with a copied fixture workspace (test/editor/support/editorSession.ts).
// Everything it or the tests started is stopped at the end, also on Ctrl+C or a crash (process groups).
// A step that fails does not skip the scenarios: they run and fail with the reason. Ends with the line
// "N passed, N failed". Screenshots: test-artifacts/editor/.
// Usage: node scripts/run-editor-tests.mjs [extra mocha args, e.g. --grep outline]
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..');
process.chdir(root);
const extraMochaArgs = process.argv.slice(2);

// One editor run at a time on a machine: two would share the package file, the artefacts folder and two
// cores. Re-run this script under flock(1) and wait for the lock.
const LOCK = join(tmpdir(), 'valleyscope-editor-tests.lock');
if (process.env.VALLEYSCOPE_EDITOR_LOCK_HELD !== '1' && spawnSync('flock', ['--version']).status === 0) {
  if (spawnSync('flock', ['-n', LOCK, 'true']).status !== 0) {
    console.log(`[editor-tests] waiting for another editor test run on this machine to finish (${LOCK})`);
  }
  // --no-fork: flock becomes the runner (holding the lock), so signals sent to the child reach the runner.
  const child = spawn('flock', ['--no-fork', LOCK, process.execPath, import.meta.filename, ...extraMochaArgs], {
    stdio: 'inherit',
    env: { ...process.env, VALLEYSCOPE_EDITOR_LOCK_HELD: '1' },
  });
  for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) process.on(sig, () => child.kill(sig));
  child.on('exit', (code, sig) => process.exit(code ?? (sig ? 1 : 0)));
} else {
  await main();
}

async function main() {
  const started = Date.now();
  const artifactsDir = resolve(process.env.VALLEYSCOPE_EDITOR_ARTIFACTS ?? join(root, 'test-artifacts', 'editor'));
  rmSync(artifactsDir, { recursive: true, force: true });
  mkdirSync(artifactsDir, { recursive: true });
  const runDir = mkdtempSync(join(tmpdir(), 'valleyscope-editor-run-'));
  const groupsFile = join(runDir, 'process-groups');
  const keepRunDir = process.env.VALLEYSCOPE_KEEP_EDITOR_RUN === '1';

  const say = (s) => console.log(`[editor-tests] ${s}`);
  const seconds = () => `${((Date.now() - started) / 1000).toFixed(0)} s`;

  // ---- cleanup of everything started -------------------------------------------------------------------
  let mochaChild;
  /** A process group with at least one process that is not a zombie (a dead child not yet reaped). */
  function groupAlive(pgid) {
    try {
      process.kill(-pgid, 0);
    } catch {
      return false;
    }
    const r = spawnSync('ps', ['-e', '-o', 'pgid=,stat='], { encoding: 'utf8' });
    if (r.status !== 0) return true;
    return r.stdout.split('\n').some((l) => {
      const [g, stat] = l.trim().split(/\s+/);
      return Number(g) === pgid && stat && !stat.startsWith('Z');
    });
  }
  function stopEverything() {
    const groups = [];
    if (mochaChild?.pid) groups.push(mochaChild.pid);
    if (existsSync(groupsFile)) {
      for (const line of readFileSync(groupsFile, 'utf8').split('\n')) {
        const n = Number(line.trim());
        if (Number.isInteger(n) && n > 1) groups.push(n);
      }
    }
    for (const g of groups)
      if (groupAlive(g))
        try {
          process.kill(-g, 'SIGTERM');
        } catch {
          /* gone */
        }
    const until = Date.now() + 3000;
    while (groups.some(groupAlive) && Date.now() < until) spawnSync('sleep', ['0.1']);
    for (const g of groups)
      if (groupAlive(g))
        try {
          process.kill(-g, 'SIGKILL');
        } catch {
          /* gone */
        }
    return groups.filter(groupAlive);
  }
  let cleaned = false;
  function cleanup() {
    if (cleaned) return;
    cleaned = true;
    const left = stopEverything();
    if (left.length) console.error(`[editor-tests] process groups still alive after SIGKILL: ${left.join(', ')}`);
    if (!keepRunDir) rmSync(runDir, { recursive: true, force: true });
  }
  process.on('exit', cleanup);
  for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP']) {
    process.on(sig, () => {
      console.error(`[editor-tests] ${sig}: stopping the editor and the browser`);
      cleanup();
      process.exit(130);
    });
  }

  // ---- 1. the editor build --------------------------------------------------------------------------------
  let unavailable = '';
  let codeServerEntry = '';
  say('preparing the editor (test/editor/install-editor.sh)');
  {
    const r = spawnSync('bash', ['test/editor/install-editor.sh'], { stdio: ['ignore', 'pipe', 'inherit'], encoding: 'utf8' });
    const lines = (r.stdout ?? '').trim().split('\n');
    codeServerEntry = lines[lines.length - 1] ?? '';
    if (r.status !== 0 || !codeServerEntry || !existsSync(codeServerEntry)) {
      unavailable = `test/editor/install-editor.sh failed (exit ${r.status}); see its messages above`;
    }
  }

  // ---- 2. the package, installed into a throw-away extensions folder ----------------------------------------
  const vsix = join(root, 'valleyscope.vsix');
  const extensionsDir = join(runDir, 'extensions');
  if (!unavailable) {
    say(`packaging (npm run package) at ${seconds()}`);
    rmSync(vsix, { force: true });
    const r = spawnSync('npm', ['run', '--silent', 'package'], { stdio: 'inherit' });
    if (r.status !== 0 || !existsSync(vsix)) unavailable = `"npm run package" failed (exit ${r.status}); see its messages above`;
    else say(`valleyscope.vsix: ${(statSync(vsix).size / 1024).toFixed(0)} KiB`);
  }
  if (!unavailable) {
    say('installing the .vsix into a throw-away extensions folder');
    mkdirSync(extensionsDir, { recursive: true });
    const r = spawnSync(
      process.execPath,
      [
        codeServerEntry,
        '--install-extension',
        vsix,
        '--extensions-dir',
        extensionsDir,
        '--user-data-dir',
        join(runDir, 'install-user-data'),
        '--config',
        join(runDir, 'install-config.yaml'),
      ],
      {
        encoding: 'utf8',
        env: { ...process.env, XDG_CONFIG_HOME: join(runDir, 'xdg-config'), XDG_DATA_HOME: join(runDir, 'xdg-data') },
        timeout: 120_000,
      },
    );
    process.stdout.write(r.stdout ?? '');
    process.stderr.write(r.stderr ?? '');
    const installed = existsSync(extensionsDir) ? readdirSync(extensionsDir).filter((d) => d.startsWith('valleyscope.valleyscope-')) : [];
    if (r.status !== 0 || installed.length === 0) unavailable = `code-server --install-extension failed (exit ${r.status})`;
    else say(`installed ${installed.join(', ')}`);
  }
  if (unavailable) say(`the scenarios will fail: ${unavailable}`);

  // ---- 3. the scenarios ------------------------------------------------------------------------------------
  const statsFile = join(runDir, 'mocha-stats.json');
  say(`running the scenarios at ${seconds()}`);
  const env = {
    ...process.env,
    VALLEYSCOPE_CODE_SERVER_ENTRY: codeServerEntry,
    VALLEYSCOPE_EXTENSIONS_DIR: extensionsDir,
    VALLEYSCOPE_EDITOR_RUN_DIR: runDir,
    VALLEYSCOPE_EDITOR_ARTIFACTS: artifactsDir,
  };
  if (unavailable) env.VALLEYSCOPE_EDITOR_UNAVAILABLE = unavailable;
  const code = await new Promise((resolveCode) => {
    mochaChild = spawn(
      process.execPath,
      [
        'node_modules/mocha/bin/mocha.js',
        '--recursive',
        'test/editor/**/*.test.ts',
        '--timeout',
        '180000',
        '--reporter',
        'test/support/summaryReporter.cjs',
        '--reporter-option',
        `statsFile=${statsFile}`,
        ...extraMochaArgs,
      ],
      { stdio: 'inherit', env, detached: true },
    );
    mochaChild.on('exit', (c, sig) => resolveCode(c ?? (sig ? 1 : 0)));
    mochaChild.on('error', () => resolveCode(1));
  });

  let passed = 0;
  let failed = 0;
  if (existsSync(statsFile)) {
    const s = JSON.parse(readFileSync(statsFile, 'utf8'));
    passed = s.passes;
    failed = s.failures;
    if (s.pending > 0) {
      // A skipped scenario is not allowed: count it as failed.
      console.error(`[editor-tests] ${s.pending} scenario(s) were skipped; counted as failed`);
      failed += s.pending;
    }
    if (s.tests === 0) {
      console.error('[editor-tests] no scenario ran');
      failed++;
    }
  } else {
    console.error('[editor-tests] mocha did not report its results');
    failed++;
  }
  cleanup();
  say(`done in ${seconds()}; screenshots in ${artifactsDir}`);
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(code !== 0 || failed > 0 ? 1 : 0);
}
