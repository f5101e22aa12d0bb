import assert from 'node:assert/strict';
import { bandViewHtml, contentSecurityPolicy, makeNonce } from '../../../src/extension/bandViewHtml';

describe('extension: band view HTML shell', () => {
  const nonce = makeNonce();
  const html = bandViewHtml({
    cspSource: 'https://file+.vscode-resource.vscode-cdn.net',
    nonce,
    scriptUri: 'https://file+.vscode-resource.vscode-cdn.net/ext/dist/webview/bandView.js',
    title: 'Bands: <EIGENVAL>',
  });

  it('makes fresh 128-bit nonces', () => {
    assert.match(nonce, /^[0-9a-f]{32}$/);
    assert.notEqual(makeNonce(), nonce);
  });

  it('has a strict content security policy: nonce scripts only, no eval, no inline, no network', () => {
    const csp = contentSecurityPolicy('vscode-src', nonce);
    assert.match(csp, /default-src 'none'/);
    assert.match(csp, new RegExp(`script-src 'nonce-${nonce}'(;|$)`));
    assert.doesNotMatch(csp, /unsafe-eval|unsafe-inline|\*|https?:\/\/(?!file)/);
    assert.match(csp, /connect-src 'none'/);
    assert.ok(html.includes(`content="${csp.replaceAll('vscode-src', 'https://file+.vscode-resource.vscode-cdn.net')}"`));
  });

  it('loads exactly one script, with the nonce, and escapes the title', () => {
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    assert.equal(scripts.length, 1);
    assert.ok(scripts[0].includes(`nonce="${nonce}"`));
    assert.ok(scripts[0].includes('dist/webview/bandView.js'));
    assert.ok(html.includes('<title>Bands: &lt;EIGENVAL&gt;</title>'));
    assert.doesNotMatch(html, /\son\w+=/, 'no inline event handlers');
  });
});
