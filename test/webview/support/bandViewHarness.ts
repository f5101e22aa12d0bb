/**
 * Runs the built band view bundle (dist/webview/bandView.js) in Debian's Chromium through playwright-core,
 * inside the same HTML shell and content security policy the extension uses (src/extension/bandViewHtml.ts),
 * with a stub `acquireVsCodeApi` that records what the view posts and lets a test post host messages.
 */
import assert from 'node:assert/strict';
import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { buildViewBundle, startPageServer } from './pageHarness';
import { chromium, type Browser, type Page } from 'playwright-core';
import { bandViewHtml } from '../../../src/extension/bandViewHtml';
import { BODY_CLASS, THEME_VARS, type TestTheme } from './themes';
import { installPageHelpers, waitForExpression } from './pageHelpers';
import { bandDataMessage, loadRunForView, type LoadedRun } from './coreBandData';
import type { ExtremumMark } from '../../../src/protocol';

export { BROWSER_PATH as CHROMIUM_PATH, BROWSER_ARGS as CHROMIUM_ARGS } from '../../../scripts/browserCheck.mjs';
import { BROWSER_PATH as CHROMIUM_PATH, BROWSER_ARGS as CHROMIUM_ARGS } from '../../../scripts/browserCheck.mjs';
export const BUNDLE = join('dist', 'webview', 'bandView.js');

/** The stub of VS Code's webview API, run before the bundle. */
const STUB = `
window.__posted = [];
window.__cspViolations = [];
window.__state = undefined;
document.addEventListener('securitypolicyviolation', function (e) {
  window.__cspViolations.push(e.violatedDirective + ' ' + e.blockedURI);
});
window.acquireVsCodeApi = function () {
  return {
    postMessage: function (m) { window.__posted.push(m); },
    getState: function () { return window.__state; },
    setState: function (s) { window.__state = s; },
  };
};
window.__hostPost = function (m) { window.postMessage(m, '*'); };
(function () {
  var p = new URLSearchParams(location.search);
  document.body.className = p.get('bodyClass') || 'vscode-dark';
  document.body.setAttribute('data-vscode-theme-kind', p.get('kind') || 'vscode-dark');
})();
`;

export interface Harness {
  origin: string;
  browser: Browser;
  close(): Promise<void>;
  open(theme: TestTheme, viewport?: { width: number; height: number }, deviceScaleFactor?: number): Promise<ViewPage>;
}

export interface ViewPage {
  page: Page;
  errors: string[];
  posted(): Promise<Array<Record<string, unknown>>>;
  hostPost(message: unknown): Promise<void>;
  cspViolations(): Promise<string[]>;
}

/**
 * The extension's own webview shell (same CSP), with the theme's variables on <html> (as VS Code puts them)
 * and the acquireVsCodeApi stub (served as /stub.js) running first with the page's nonce, as VS Code's
 * preload does.
 */
export function testPageHtml(origin: string, scriptUri: string, title: string, theme: TestTheme): string {
  const nonce = randomBytes(16).toString('hex');
  let html = bandViewHtml({ cspSource: origin, nonce, scriptUri, title });
  const vars = Object.entries(THEME_VARS[theme])
    .map(([k, v]) => `${k}: ${v};`)
    .join(' ');
  html = html.replace('</head>', `  <style nonce="${nonce}">html { ${vars} }</style>\n</head>`);
  return html.replace(`<script nonce="${nonce}"`, `<script nonce="${nonce}" src="${origin}/stub.js"></script>\n  <script nonce="${nonce}"`);
}

export async function startHarness(): Promise<Harness> {
  if (!existsSync(CHROMIUM_PATH)) throw new Error(`${CHROMIUM_PATH} is missing: run scripts/install-test-deps.sh`);
  const bundle = await buildViewBundle('webview/bandView/main.ts', 'bandView');
  const server = await startPageServer({
    bundlePath: '/bandView.js',
    bundle,
    stub: STUB,
    page: (url, origin) =>
      testPageHtml(origin, `${origin}/bandView.js`, 'Band view test', (url.searchParams.get('theme') ?? 'dark') as TestTheme),
  });
  const origin = server.origin;
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
  return {
    origin,
    browser,
    async close() {
      await browser.close();
      await server.close();
    },
    async open(theme, viewport = { width: 1280, height: 760 }, deviceScaleFactor = 1) {
      const page = await browser.newPage({ viewport, deviceScaleFactor });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
      page.on('console', (m) => {
        if (m.type() === 'error') errors.push(`console: ${m.text()}`);
      });
      const bc = BODY_CLASS[theme];
      await page.goto(`${origin}/?theme=${theme}&bodyClass=${bc.cls}&kind=${bc.kind}`);
      await waitForExpression(page, 'window.valleyscopeBandView !== undefined');
      return {
        page,
        errors,
        posted: () =>
          page.evaluate(() => (window as unknown as { __posted: Array<Record<string, unknown>> }).__posted.map((m) => ({ ...m }))),
        hostPost: (message: unknown) =>
          page.evaluate((m) => (window as unknown as { __hostPost(m: unknown): void }).__hostPost(m), message as object),
        cspViolations: () => page.evaluate(() => (window as unknown as { __cspViolations: string[] }).__cspViolations),
      };
    },
  };
}

/** Where the suites write screenshots and exported images. */
export const ARTIFACTS = 'test-artifacts';

/**
 * The harness and the silicon run (empirical pseudopotential model of Cohen & Bergstresser, Phys. Rev. 141,
 * 789 (1966), fixtures/epm/si) of one describe block: started before its tests, closed after them.
 */
export function siliconSession(): { h: Harness; run: LoadedRun } {
  const session = {} as { h: Harness; run: LoadedRun };
  before(async function () {
    mkdirSync(ARTIFACTS, { recursive: true });
    session.h = await startHarness();
    session.run = await loadRunForView('fixtures/epm/si', 'Si (EPM)');
  });
  after(async () => {
    if (session.h) await session.h.close();
  });
  return session;
}

/** A page showing the run, once its first draw is done. */
export async function openWithRun(
  h: Harness,
  run: LoadedRun,
  theme: TestTheme = 'dark',
  viewport?: { width: number; height: number },
): Promise<ViewPage> {
  const v = await h.open(theme, viewport);
  await installPageHelpers(v.page);
  await v.hostPost(bandDataMessage(run.data));
  await waitForExpression(v.page, 'window.valleyscopeBandView.lastDraw !== null');
  return v;
}

/** Waits until the view has posted `count` messages of `type`; returns the last of them. */
export async function waitPosted(v: ViewPage, type: string, count: number): Promise<Record<string, unknown>> {
  await waitForExpression(v.page, `window.__posted.filter(function (m) { return m.type === ${JSON.stringify(type)}; }).length >= ${count}`);
  return (await v.posted()).filter((m) => m.type === type).pop()!;
}

/** The run's extremum of this kind (the test fails when the core reports none). */
export function markOf(run: LoadedRun, kind: ExtremumMark['kind']): ExtremumMark {
  const m = run.data.marks.find((x) => x.kind === kind);
  assert.ok(m, `the core reports a ${kind} for ${run.data.title}`);
  return m;
}
