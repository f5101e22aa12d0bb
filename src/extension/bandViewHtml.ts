/**
 * The HTML shell of the band view: a strict content security policy (scripts only with this page's nonce,
 * no eval, no remote loads, no network), the bundled script from dist/webview, nothing else. Pure.
 */

/** 128 random bits as hex, from the platform's crypto (node 20 and browsers both have it). */
export function makeNonce(): string {
  const b = new Uint8Array(16);
  globalThis.crypto.getRandomValues(b);
  return Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
}

export interface ShellOptions {
  /** webview.cspSource: the origin the webview serves local resources from. */
  cspSource: string;
  nonce: string;
  /** URI of dist/webview/bandView.js as the webview sees it. */
  scriptUri: string;
  title: string;
  /** The run's URI, kept by the view so the window can reopen it after a reload. */
  runUri?: string;
}

export function contentSecurityPolicy(cspSource: string, nonce: string): string {
  return [
    "default-src 'none'",
    `script-src 'nonce-${nonce}'`,
    `style-src ${cspSource} 'nonce-${nonce}'`,
    `img-src ${cspSource} data: blob:`,
    `font-src ${cspSource}`,
    "connect-src 'none'",
    "frame-src 'none'",
    "form-action 'none'",
    "base-uri 'none'",
  ].join('; ');
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function bandViewHtml(o: ShellOptions): string {
  return `<!DOCTYPE html>
<html lang="en">
<head>
  <meta charset="UTF-8">
  <meta http-equiv="Content-Security-Policy" content="${contentSecurityPolicy(o.cspSource, o.nonce)}">
  <meta name="viewport" content="width=device-width, initial-scale=1.0">
  <title>${escapeHtml(o.title)}</title>
</head>
<body>
  <div id="app" data-nonce="${o.nonce}"${o.runUri ? ` data-run="${escapeHtml(o.runUri)}"` : ''}></div>
  <script nonce="${o.nonce}" src="${escapeHtml(o.scriptUri)}"></script>
</body>
</html>
`;
}
