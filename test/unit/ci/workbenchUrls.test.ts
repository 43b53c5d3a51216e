/**
 * The browser layers' request watch (scripts/e2e-workbench.mjs): what counts as staying on
 * this machine, and what is the workbench's own virtual host of webview resources. URL forms
 * from the WHATWG URL standard; the resource host is the form `asWebviewUri` gives in the
 * code-server workbench (seen in this project's host-layer log).
 */
import { strict as assert } from 'node:assert';

describe('request watch of the browser layers', () => {
  let isLocalUrl: (url: string) => boolean;
  let isWebviewResourceUrl: (url: string) => boolean;
  before(async () => {
    ({ isLocalUrl, isWebviewResourceUrl } = await import('../../../scripts/e2e-workbench.mjs'));
  });

  it('loopback and browser-internal URLs stay on the machine; other hosts do not', () => {
    assert.ok(isLocalUrl('http://127.0.0.1:43981/stable/static/out/vs/workbench.js'));
    assert.ok(isLocalUrl('data:text/plain,hi'));
    assert.ok(isLocalUrl('blob:http://127.0.0.1:1/abc'));
    assert.ok(!isLocalUrl('https://127.0.0.1.example.com/'));
    assert.ok(!isLocalUrl('https://update.code.visualstudio.com/api'));
    assert.ok(!isLocalUrl('not a url'));
  });

  it('only the vscode-resource subdomains of vscode-cdn.net are webview resources', () => {
    const ok = 'https://vscode-remote+127-002e0-002e0-002e1-003a43981.vscode-resource.vscode-cdn.net/w/dist/webview/main.js';
    assert.ok(isWebviewResourceUrl(ok));
    assert.ok(!isWebviewResourceUrl('https://vscode-resource.vscode-cdn.net.example.com/main.js'));
    assert.ok(!isWebviewResourceUrl('https://example.com/x.vscode-resource.vscode-cdn.net/main.js'));
    assert.ok(!isWebviewResourceUrl('https://main.vscode-cdn.net/stable/main.js'));
    assert.ok(!isWebviewResourceUrl('::'));
  });
});
