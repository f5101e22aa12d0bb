/**
 * Output through a pipe is never cut: the CLI exits only once standard output has drained. The reader here
 * is slow on purpose: after the first chunk it stops reading until the CLI has exited (or 4 s have passed,
 * which is what happens when the CLI rightly waits for its output to drain). So the pipe is full when the
 * CLI wants to exit; a CLI that exits at once loses what the pipe could not take (64 KiB on Linux).
 */
import assert from 'node:assert/strict';
import { spawn } from 'node:child_process';
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeTinyRun } from '../../annotations/tinyRun';

const ROOT = join(__dirname, '..', '..', '..', '..');

function runThroughSlowPipe(args: string[]): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', join(ROOT, 'src', 'cli', 'main.ts'), ...args], {
      cwd: ROOT,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    const chunks: Buffer[] = [];
    let err = '';
    let paused = false;
    let exited = false;
    child.on('exit', () => (exited = true));
    child.stdout.on('data', (c: Buffer) => {
      chunks.push(c);
      if (!paused) {
        paused = true;
        child.stdout.pause();
        const t0 = Date.now();
        const wait = setInterval(() => {
          if (exited || Date.now() - t0 > 4000) {
            clearInterval(wait);
            child.stdout.resume();
          }
        }, 50);
      }
    });
    child.stderr.on('data', (c: Buffer) => (err += c.toString()));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout: Buffer.concat(chunks).toString('utf8'), stderr: err }));
  });
}

describe('output through a pipe', function () {
  this.timeout(120000);
  const demo = join('fixtures', 'demo');
  const runs = [
    join(demo, 'gaas-bulk'),
    join(demo, 'si-bulk'),
    ...readdirSync(join(ROOT, demo, 'si-strain'), { withFileTypes: true })
      .filter((d) => d.isDirectory())
      .map((d) => join(demo, 'si-strain', d.name)),
  ];

  it('compare --format json of many runs arrives whole and parses', async () => {
    const r = await runThroughSlowPipe(['compare', ...runs, ...runs, ...runs, ...runs, '--format', 'json']);
    assert.equal(r.code, 0, r.stderr);
    assert.ok(r.stdout.length > 256 * 1024, `only ${r.stdout.length} bytes: the test needs more than the pipe holds`);
    const c = JSON.parse(r.stdout) as { runs: unknown[] };
    assert.equal(c.runs.length, runs.length * 4);
  });

  it('analyze --jsonl of many runs arrives whole, every line parses', async () => {
    const root = join(mkdtempSync(join(tmpdir(), 'vs-pipe-')), 'screen');
    for (let i = 0; i < 120; i++) writeTinyRun(join(root, `run-${String(i).padStart(3, '0')}`), { gap_eV: 0.5 + i / 100 });
    const r = await runThroughSlowPipe(['analyze', root, '--jsonl', '--jobs', '2']);
    assert.equal(r.code, 0, r.stderr);
    assert.ok(r.stdout.length > 256 * 1024, `only ${r.stdout.length} bytes: the test needs more than the pipe holds`);
    assert.ok(r.stdout.endsWith('\n'));
    // stderr is a pipe here, not a terminal: no progress line.
    assert.doesNotMatch(r.stderr, /\r|runs analysed/);
    const lines = r.stdout
      .trimEnd()
      .split('\n')
      .map((l) => JSON.parse(l) as { path: string; gap: { eV: number } });
    assert.equal(lines.length, 120);
    // Tight-binding model of tinyRun.ts: the gap is the E_g written, 0.5 + i/100 eV, in path order.
    lines.forEach((l, i) => assert.ok(Math.abs(l.gap.eV - (0.5 + i / 100)) < 2e-6, l.path));
  });
});
