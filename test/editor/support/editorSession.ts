/**
 * One real VS Code for a scenario group: code-server (VS Code 1.100.3 server + web workbench) started on
 * loopback in its own process group with a fixture workspace, and Debian's Chromium driving the workbench
 * through playwright-core. `close()` stops both; the process-group id is also written to the run folder so
 * the runner can stop it if this process dies first.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { appendFileSync, cpSync, createWriteStream, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { createServer } from 'node:net';
import { join } from 'node:path';
import { chromium, type Browser, type FrameLocator, type Locator, type Page } from 'playwright-core';
import { editorTestEnvironment, type EditorTestEnvironment } from './environment';
// Chromium flags that work on these machines (see ../../../../shared/editor-tests.md).
import { BROWSER_ARGS, BROWSER_PATH } from '../../../scripts/browserCheck.mjs';

export interface SessionOptions {
  /** Name used for folders and logs. */
  name: string;
  /** Folders or files to copy into the workspace: [source, name inside the workspace]. */
  workspace: Array<[string, string]>;
  /** Workspace trust on (restricted mode possible) or off (everything trusted, no prompt). */
  trust?: boolean;
  /** Extra user settings. */
  settings?: Record<string, unknown>;
}

async function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => resolvePort(port));
    });
  });
}

function httpStatus(port: number): Promise<number> {
  return new Promise((resolveStatus) => {
    const req = request({ host: '127.0.0.1', port, path: '/', method: 'GET', timeout: 2000 }, (res) => {
      res.resume();
      resolveStatus(res.statusCode ?? 0);
    });
    req.on('error', () => resolveStatus(0));
    req.on('timeout', () => {
      req.destroy();
      resolveStatus(0);
    });
    req.end();
  });
}

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/**
 * playwright starts Chromium in a process group of its own; write the groups of this process's Chromium
 * children to the run folder too, so the runner can stop them if this process dies before closing them.
 */
function recordBrowserGroups(runDir: string): void {
  const r = spawnSync('ps', ['-o', 'pid=,pgid=,comm=', '--ppid', String(process.pid)], { encoding: 'utf8' });
  for (const line of (r.stdout ?? '').split('\n')) {
    const [pid, pgid, comm] = line.trim().split(/\s+/);
    if (comm && /chrom/i.test(comm) && pid === pgid) appendFileSync(join(runDir, 'process-groups'), `${pgid}\n`);
  }
}

/** Stop a process group: SIGTERM, then SIGKILL when it has not gone after a grace period. */
export async function stopProcessGroup(pgid: number, graceMs = 3000): Promise<void> {
  const alive = (): boolean => {
    try {
      process.kill(-pgid, 0);
      return true;
    } catch {
      return false;
    }
  };
  if (!alive()) return;
  try {
    process.kill(-pgid, 'SIGTERM');
  } catch {
    return;
  }
  const until = Date.now() + graceMs;
  while (alive() && Date.now() < until) await sleep(100);
  if (alive()) {
    try {
      process.kill(-pgid, 'SIGKILL');
    } catch {
      /* already gone */
    }
  }
}

export class EditorSession {
  readonly env: EditorTestEnvironment;
  readonly workspaceDir: string;
  readonly port: number;
  private readonly server: ChildProcess;
  private browser: Browser | undefined;
  page!: Page;
  private readonly logPath: string;

  private constructor(env: EditorTestEnvironment, workspaceDir: string, port: number, server: ChildProcess, logPath: string) {
    this.env = env;
    this.workspaceDir = workspaceDir;
    this.port = port;
    this.server = server;
    this.logPath = logPath;
  }

  /** Start code-server with a copy of the workspace and open it in Chromium; throws when either fails. */
  static async start(opts: SessionOptions): Promise<EditorSession> {
    const env = editorTestEnvironment();
    mkdirSync(env.runDir, { recursive: true });
    const base = mkdtempSync(join(env.runDir, `${opts.name}-`));
    const workspaceDir = join(base, 'workspace');
    const userData = join(base, 'user-data');
    mkdirSync(workspaceDir, { recursive: true });
    mkdirSync(join(userData, 'User'), { recursive: true });
    for (const [src, name] of opts.workspace) cpSync(src, join(workspaceDir, name), { recursive: true });
    const settings = {
      'security.workspace.trust.enabled': opts.trust ?? false,
      'workbench.startupEditor': 'none',
      'workbench.tips.enabled': false,
      'workbench.enableExperiments': false,
      'workbench.secondarySideBar.defaultVisibility': 'hidden',
      'chat.commandCenter.enabled': false,
      'telemetry.telemetryLevel': 'off',
      'update.mode': 'none',
      'extensions.autoCheckUpdates': false,
      'extensions.autoUpdate': false,
      'extensions.ignoreRecommendations': true,
      'files.autoSave': 'off',
      'window.restoreWindows': 'none',
      'editor.codeLens': true,
      // Typed text arrives as typed (hand edits in the annotations scenario).
      'editor.autoClosingQuotes': 'never',
      'editor.autoClosingBrackets': 'never',
      'editor.autoIndent': 'none',
      'editor.formatOnType': false,
      'editor.acceptSuggestionOnEnter': 'off',
      'editor.quickSuggestions': { other: false, comments: false, strings: false },
      // Outline rows: one per path segment until expanded.
      'outline.collapseItems': 'alwaysCollapse',
      ...opts.settings,
    };
    writeFileSync(join(userData, 'User', 'settings.json'), JSON.stringify(settings, null, 2));

    const port = await freePort();
    const logPath = join(base, 'code-server.log');
    const log = createWriteStream(logPath);
    const server = spawn(
      process.execPath,
      [
        env.codeServerEntry,
        '--auth',
        'none',
        '--bind-addr',
        `127.0.0.1:${port}`,
        '--disable-telemetry',
        '--disable-update-check',
        '--config',
        join(base, 'code-server-config.yaml'),
        '--user-data-dir',
        userData,
        '--extensions-dir',
        env.extensionsDir,
        workspaceDir,
      ],
      {
        detached: true, // its own process group, stopped by that id
        stdio: ['ignore', 'pipe', 'pipe'],
        env: { ...process.env, XDG_CONFIG_HOME: join(base, 'xdg-config'), XDG_DATA_HOME: join(base, 'xdg-data') },
      },
    );
    server.stdout?.pipe(log);
    server.stderr?.pipe(log);
    if (server.pid === undefined) throw new Error('code-server did not start (no process id)');
    appendFileSync(join(env.runDir, 'process-groups'), `${server.pid}\n`);
    const session = new EditorSession(env, workspaceDir, port, server, logPath);
    try {
      const until = Date.now() + 60_000;
      let status = 0;
      while (Date.now() < until) {
        if (server.exitCode !== null) throw new Error(`code-server exited with code ${server.exitCode}; see ${logPath}`);
        status = await httpStatus(port);
        if (status === 302 || status === 200) break;
        await sleep(250);
      }
      if (status !== 302 && status !== 200) throw new Error(`code-server did not answer on 127.0.0.1:${port} within 60 s; see ${logPath}`);
      session.browser = await chromium.launch({ executablePath: BROWSER_PATH, args: BROWSER_ARGS });
      recordBrowserGroups(env.runDir);
      const context = await session.browser.newContext({ viewport: { width: 1920, height: 1080 } });
      session.page = await context.newPage();
      await session.page.goto(`http://127.0.0.1:${port}/?folder=${encodeURIComponent(workspaceDir)}`);
      await session.page.locator('.monaco-workbench').waitFor({ timeout: 60_000 });
      // The explorer lists the workspace once the file service is up.
      await session.page.locator('.explorer-folders-view .monaco-list-row').first().waitFor({ timeout: 60_000 });
      return session;
    } catch (e) {
      await session.close();
      throw e;
    }
  }

  /** Path of a file inside the workspace copy. */
  path(...parts: string[]): string {
    return join(this.workspaceDir, ...parts);
  }

  /** Stop the browser and the editor (its whole process group). Safe to call twice. */
  async close(): Promise<void> {
    try {
      await this.browser?.close();
    } catch {
      /* the browser may already be gone */
    }
    this.browser = undefined;
    if (this.server.pid !== undefined) await stopProcessGroup(this.server.pid);
  }

  /** Save a screenshot of what a user sees now, as a test artefact. */
  async screenshot(name: string): Promise<string> {
    mkdirSync(this.env.artifactsDir, { recursive: true });
    const file = join(this.env.artifactsDir, `${name}.png`);
    await this.page.screenshot({ path: file });
    return file;
  }

  /** Focus the workbench (keyboard shortcuts need a focused page). */
  async focusWorkbench(): Promise<void> {
    await this.page.keyboard.press('Escape');
    await this.page
      .locator('.monaco-workbench .part.statusbar')
      .click({ position: { x: 5, y: 5 } })
      .catch(() => undefined);
  }

  /** Run a command from the command palette by its exact title (e.g. "Valleyscope: Open Band View"). */
  async runCommand(title: string): Promise<void> {
    await this.focusWorkbench();
    await this.page.keyboard.press('Control+Shift+P');
    const input = this.page.locator('.quick-input-widget input');
    await input.waitFor({ state: 'visible', timeout: 15_000 });
    await input.fill(`>${title}`);
    const row = this.page.locator('.quick-input-widget .monaco-list-row', { hasText: title }).first();
    await row.waitFor({ state: 'visible', timeout: 15_000 });
    await row.click();
    await input.waitFor({ state: 'hidden', timeout: 15_000 }).catch(() => undefined);
  }

  /** Open a workspace file in an editor through Quick Open (workspace-relative path with '/'). */
  async openFile(relativePath: string): Promise<void> {
    await this.focusWorkbench();
    await this.page.keyboard.press('Control+P');
    const input = this.page.locator('.quick-input-widget input');
    await input.waitFor({ state: 'visible', timeout: 15_000 });
    await input.fill(relativePath);
    const base = relativePath.split('/').pop() ?? relativePath;
    const dir = relativePath.includes('/') ? relativePath.slice(0, relativePath.lastIndexOf('/')) : '';
    const row = this.page.locator('.quick-input-widget .monaco-list-row', { hasText: dir }).filter({ hasText: base }).first();
    await row.waitFor({ state: 'visible', timeout: 30_000 });
    await row.click();
    await this.page.locator(`.tabs-container .tab.active[aria-label*="${base}"]`).waitFor({ timeout: 30_000 });
    await this.page.locator('.editor-instance .monaco-editor .view-lines').first().waitFor({ timeout: 30_000 });
  }

  /** The band view's content frame (a webview is two iframes deep). */
  webview(): FrameLocator {
    return this.page.frameLocator('iframe.webview.ready').last().frameLocator('iframe#active-frame');
  }

  /** The text area of the editor that has focus (the active editor group's). */
  activeEditorText(): Locator {
    return this.page.locator('.editor-group-container.active .editor-instance .monaco-editor .view-lines').first();
  }

  /** Close every editor (and webview panel) without saving prompts for clean editors, and the bottom panel. */
  async closeAllEditors(): Promise<void> {
    await this.runCommand('View: Hide Panel').catch(() => undefined);
    await this.runCommand('View: Close All Editors');
    // A scenario that failed half-way may leave an unsaved editor: do not save it, do not block the next one.
    const dontSave = this.page.locator('.monaco-dialog-box .monaco-button', { hasText: "Don't Save" }).first();
    await dontSave.waitFor({ state: 'visible', timeout: 1500 }).then(
      () => dontSave.click(),
      () => undefined,
    );
    await this.page
      .locator('.tabs-container .tab')
      .first()
      .waitFor({ state: 'detached', timeout: 15_000 })
      .catch(() => undefined);
  }

  /** Labels of the top-level rows of the Outline view (opened in the Explorer), waiting until there are `min`. */
  async outlineLabels(min: number, timeoutMs = 60_000): Promise<string[]> {
    const header = this.page.locator('.pane-header', { hasText: /^\s*Outline/i }).first();
    await header.waitFor({ timeout: 15_000 });
    // Room for the outline: fold the file tree's section (the first section of the Explorer).
    const files = this.page.locator('.explorer-viewlet .pane-header').first();
    if ((await files.getAttribute('aria-expanded')) === 'true' && !(await files.innerText()).match(/outline/i)) await files.click();
    if ((await header.getAttribute('aria-expanded')) !== 'true') await header.click();
    const rows = this.page.locator('.outline-pane .monaco-list-row[aria-level="1"]');
    const until = Date.now() + timeoutMs;
    let labels: string[] = [];
    let previous = '';
    while (Date.now() < until) {
      labels = (await rows.locator('.label-name').allInnerTexts()).map((l) => l.trim());
      // Enough rows, and the same list twice in a row (the outline fills in as symbols arrive).
      if (labels.length >= min && labels.join('\n') === previous) return labels;
      previous = labels.join('\n');
      await sleep(400);
    }
    return labels;
  }

  /** Text of each row of the Problems panel (message, source, "[Ln x, Col y]"), waiting for `min` rows. */
  async problems(min: number, timeoutMs = 60_000): Promise<string[]> {
    const panelRows = this.page.locator('.markers-panel .monaco-list-row');
    if ((await this.page.locator('.markers-panel').count()) === 0 || !(await this.page.locator('.markers-panel').first().isVisible())) {
      await this.runCommand('View: Toggle Problems');
    }
    await this.page.locator('.markers-panel').first().waitFor({ timeout: 15_000 });
    const until = Date.now() + timeoutMs;
    for (;;) {
      const rows = await panelRows.allInnerTexts();
      // (A file's row, then its problems.)
      if (rows.length >= min || Date.now() >= until) return rows;
      await sleep(250);
    }
  }

  /** Click the code lens of the active editor whose text contains `text`. */
  async clickCodeLens(text: string, timeoutMs = 60_000): Promise<void> {
    const lens = this.page.locator('.editor-instance .monaco-editor .codelens-decoration a', { hasText: text }).first();
    await lens.waitFor({ state: 'visible', timeout: timeoutMs });
    await lens.click();
  }

  /** Text of the code lenses of the active editor. */
  async codeLensTexts(): Promise<string[]> {
    return this.page.locator('.editor-instance .monaco-editor .codelens-decoration').allInnerTexts();
  }

  /** Text of the notification toasts now shown. */
  async notifications(): Promise<string[]> {
    return this.page.locator('.notifications-toasts .notification-list-item-message').allInnerTexts();
  }

  /** The code-server log so far (for failure messages). */
  get serverLog(): string {
    return this.logPath;
  }
}

/** Wait until `check` returns a value (not undefined), polling; throws `message` on timeout. */
export async function waitFor<T>(check: () => T | undefined | Promise<T | undefined>, message: string, timeoutMs = 30_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v !== undefined) return v;
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs / 1000} s: ${message}`);
    await sleep(250);
  }
}
