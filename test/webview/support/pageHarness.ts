/**
 * What the headless-browser tests of the webviews share: the view bundle built the way esbuild.mjs builds it
 * (IIFE for the browser), and a local HTTP server giving the page, the acquireVsCodeApi stub and the bundle.
 */
import { createServer, type Server } from 'node:http';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as esbuild from 'esbuild';

/** Builds one webview entry to dist/webview/<out>.js and returns the bundle. */
export async function buildViewBundle(entry: string, out: string): Promise<Buffer> {
  await esbuild.build({
    entryPoints: [{ in: entry, out }],
    outdir: join('dist', 'webview'),
    bundle: true,
    platform: 'browser',
    format: 'iife',
    target: 'es2022',
    sourcemap: true,
    logLevel: 'warning',
  });
  return readFileSync(join('dist', 'webview', `${out}.js`));
}

export interface PageRoutes {
  /** Path of the bundle on the server, e.g. '/compareView.js'. */
  bundlePath: string;
  bundle: Buffer;
  /** The acquireVsCodeApi stub, served as /stub.js. */
  stub: string;
  /** The HTML of '/' for a request (its query may choose a theme) and the server's origin. */
  page(url: URL, origin: string): string;
}

export interface PageServer {
  /** http://127.0.0.1:<port> */
  origin: string;
  close(): Promise<void>;
}

/** Serves '/', '/stub.js' and the bundle on a free local port; 404 for anything else (204 for the icon). */
export async function startPageServer(routes: PageRoutes): Promise<PageServer> {
  let origin = '';
  const server: Server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://127.0.0.1');
    if (url.pathname === routes.bundlePath || url.pathname === '/stub.js') {
      res.writeHead(200, { 'content-type': 'text/javascript' });
      res.end(url.pathname === '/stub.js' ? routes.stub : routes.bundle);
    } else if (url.pathname === '/') {
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
      res.end(routes.page(url, origin));
    } else {
      res.writeHead(url.pathname === '/favicon.ico' ? 204 : 404);
      res.end();
    }
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const addr = server.address();
  if (!addr || typeof addr === 'string') throw new Error('no server address');
  origin = `http://127.0.0.1:${addr.port}`;
  return { origin, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}
