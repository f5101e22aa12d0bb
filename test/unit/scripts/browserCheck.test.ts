/**
 * `npm test` on a fresh machine: the check before the webview suite, on machines played by the test (the real
 * one is never changed): browser present, absent without root (one sentence with the exact command), absent
 * with root (installed through scripts/install-test-deps.sh), and an install that fails.
 */
import { strict as assert } from 'node:assert';

import type { Machine } from '../../../scripts/browserCheck.mjs';

async function load(): Promise<typeof import('../../../scripts/browserCheck.mjs')> {
  return import('../../../scripts/browserCheck.mjs');
}

function machine(opts: { present: boolean; root: boolean; installWorks?: boolean }): Machine & { logs: string[]; installs: number } {
  let present = opts.present;
  const m = {
    logs: [] as string[],
    installs: 0,
    exists: (): boolean => present,
    isRoot: (): boolean => opts.root,
    install: (): number => {
      m.installs++;
      if (opts.installWorks) present = true;
      return opts.installWorks ? 0 : 100;
    },
    log: (t: string): void => void m.logs.push(t),
  };
  return m;
}

describe('npm test: the browser check before the webview suite', () => {
  it('does nothing when the browser is there', async () => {
    const { ensureBrowser } = await load();
    const m = machine({ present: true, root: false });
    assert.deepEqual(ensureBrowser(m), { ok: true, installed: false, sentence: null });
    assert.equal(m.installs, 0);
    assert.deepEqual(m.logs, []);
  });

  it('with the browser absent and no root, prints one sentence with the exact command', async () => {
    const { ensureBrowser, BROWSER_PATH } = await load();
    const m = machine({ present: false, root: false });
    const r = ensureBrowser(m);
    assert.equal(r.ok, false);
    assert.equal(m.installs, 0, 'nothing is installed without root');
    assert.equal(
      r.sentence,
      `The webview tests need Debian's Chromium at ${BROWSER_PATH}, which is not installed and cannot be installed without root: run "sudo bash scripts/install-test-deps.sh" (it installs the chromium package), then "npm test" again.`,
    );
    assert.deepEqual(m.logs, [r.sentence]);
  });

  it('with the browser absent as root, installs it through scripts/install-test-deps.sh', async () => {
    const { ensureBrowser } = await load();
    const m = machine({ present: false, root: true, installWorks: true });
    assert.deepEqual(ensureBrowser(m), { ok: true, installed: true, sentence: null });
    assert.equal(m.installs, 1);
    assert.match(m.logs[0]!, /installing Debian's chromium .*scripts\/install-test-deps\.sh/);
  });

  it('says so when the install fails', async () => {
    const { ensureBrowser } = await load();
    const m = machine({ present: false, root: true, installWorks: false });
    const r = ensureBrowser(m);
    assert.equal(r.ok, false);
    assert.match(r.sentence!, /exited with 100\); run "bash scripts\/install-test-deps\.sh" as root/);
  });
});
