import assert from 'node:assert/strict';
import { buildContentSecurityPolicy, escapeHtml, renderWebviewHtml } from '../../../extension/core/view/renderWebviewHtml';

const NONCE = 'c0ffee00-1234-4abc-8def-0123456789ab';
const CSP_SOURCE = 'https://*.vscode-cdn.net';

// CSP Level 3 (W3C, §2.2 "Policies"): serialized-policy = directive *( OWS ";" OWS directive ),
// directive-name = 1*( ALPHA / DIGIT / "-" ), directive values are source expressions separated
// by required whitespace. nonce-source = "'nonce-" base64-value "'" with
// base64-value = 1*( ALPHA / DIGIT / "+" / "/" / "-" / "_" )*2( "=" ).
function parsePolicy(policy: string): Map<string, string[]> {
  const directives = new Map<string, string[]>();
  for (const token of policy.split(';')) {
    const parts = token.trim().split(/[ \t]+/);
    assert.match(parts[0], /^[A-Za-z0-9-]+$/, `directive name per CSP3 grammar: ${parts[0]}`);
    assert.ok(!directives.has(parts[0]), `duplicate directive ${parts[0]} (CSP3 ignores the second)`);
    directives.set(parts[0], parts.slice(1));
  }
  return directives;
}

describe('renderWebviewHtml', () => {
  it('builds a policy that denies by default and allows scripts only by nonce', () => {
    const directives = parsePolicy(buildContentSecurityPolicy(CSP_SOURCE, NONCE));
    assert.deepEqual(directives.get('default-src'), ["'none'"]);
    assert.deepEqual(directives.get('script-src'), [`'nonce-${NONCE}'`]);
    assert.match(directives.get('script-src')![0], /^'nonce-[A-Za-z0-9+/_-]+={0,2}'$/);
    assert.deepEqual(directives.get('style-src'), [CSP_SOURCE]);
    assert.deepEqual(directives.get('img-src'), [CSP_SOURCE, 'data:']);
    assert.deepEqual(directives.get('font-src'), [CSP_SOURCE]);
    for (const values of directives.values()) {
      assert.ok(!values.includes("'unsafe-inline'") && !values.includes("'unsafe-eval'") && !values.includes('*'));
    }
  });

  it('puts the nonce on every script element and loads nothing from outside the given origins', () => {
    const html = renderWebviewHtml({
      cspSource: CSP_SOURCE, nonce: NONCE, title: 'Metrics',
      scriptUri: 'https://file+.vscode-resource.vscode-cdn.net/ext/dist/webview.js',
      styleUris: ['https://file+.vscode-resource.vscode-cdn.net/ext/media/viewer.css'],
    });
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    assert.equal(scripts.length, 1);
    for (const tag of scripts) assert.ok(tag.includes(`nonce="${NONCE}"`), tag);
    const urls = [...html.matchAll(/(?:src|href)="([^"]+)"/g)].map((m) => m[1]);
    assert.equal(urls.length, 2);
    for (const url of urls) assert.ok(url.startsWith('https://file+.vscode-resource.vscode-cdn.net/'), url);
    // The CSP meta must precede any resource it governs (CSP3 §3.3: policies apply from the meta on).
    assert.ok(html.indexOf('http-equiv="Content-Security-Policy"') < html.indexOf('<link'));
    assert.ok(!/ style="/.test(html), 'no inline style attributes (style-src has no unsafe-inline)');
  });

  it('escapes interpolated text so a title cannot open an element', () => {
    const html = renderWebviewHtml({ cspSource: CSP_SOURCE, nonce: NONCE, title: '</title><script>x()</script>', scriptUri: 'a.js', styleUris: [] });
    assert.equal((html.match(/<script\b/g) ?? []).length, 1);
    // HTML Living Standard §13.1.2.3: in attribute values & and " must be escaped; < > in text.
    assert.equal(escapeHtml(`a&b"c<d>'`), 'a&amp;b&quot;c&lt;d&gt;&#39;');
  });

  it('rejects nonces and sources that could break out of the policy', () => {
    assert.throws(() => buildContentSecurityPolicy(CSP_SOURCE, "abc'; script-src *"), /expected a nonce/);
    assert.throws(() => buildContentSecurityPolicy(CSP_SOURCE, 'short'), /expected a nonce/);
    assert.throws(() => buildContentSecurityPolicy("x; script-src 'unsafe-inline'", NONCE), /expected CSP source expressions/);
    assert.throws(() => buildContentSecurityPolicy("'unsafe-inline'", NONCE), /expected CSP source expressions/);
    assert.throws(() => buildContentSecurityPolicy('', NONCE), /expected CSP source expressions/);
  });

  it("accepts the web editor's multi-source cspSource (seen in code-server 4.100.3 = VS Code 1.100.3)", () => {
    const directives = parsePolicy(buildContentSecurityPolicy("'self' https://*.vscode-cdn.net", NONCE));
    assert.deepEqual(directives.get('style-src'), ["'self'", 'https://*.vscode-cdn.net']);
    assert.deepEqual(directives.get('img-src'), ["'self'", 'https://*.vscode-cdn.net', 'data:']);
    assert.deepEqual(directives.get('script-src'), [`'nonce-${NONCE}'`]);
    assert.deepEqual(parsePolicy(buildContentSecurityPolicy('vscode-webview-resource:', NONCE)).get('font-src'), ['vscode-webview-resource:']);
  });
});

describe('renderWebviewHtml parsed by a WHATWG HTML parser (parse5, reference implementation of the HTML Standard parsing algorithm)', () => {
  it('round-trips hostile titles as text and keeps the CSP meta first in <head>', async () => {
    const { parse } = await import('parse5');
    const title = `Metrics — "pantry-db" <b>&amp;</b> 'x'`;
    const html = renderWebviewHtml({ cspSource: CSP_SOURCE, nonce: NONCE, title, scriptUri: 'https://r/dist/webview.js', styleUris: ['https://r/media/viewer.css'] });
    type Node = { nodeName: string; attrs?: { name: string; value: string }[]; childNodes?: Node[]; value?: string };
    const document = parse(html) as unknown as Node;
    const all: Node[] = [];
    const walk = (node: Node): void => { all.push(node); for (const child of node.childNodes ?? []) walk(child); };
    walk(document);
    const head = all.find((n) => n.nodeName === 'head')!;
    const headElements = (head.childNodes ?? []).filter((n) => !n.nodeName.startsWith('#'));
    assert.equal(headElements[0].nodeName, 'meta');
    const csp = headElements.find((n) => n.attrs?.some((a) => a.name === 'http-equiv' && a.value === 'Content-Security-Policy'));
    assert.equal(csp?.attrs?.find((a) => a.name === 'content')?.value, buildContentSecurityPolicy(CSP_SOURCE, NONCE));
    const titleNode = all.find((n) => n.nodeName === 'title')!;
    assert.equal(titleNode.childNodes?.[0].value, title);
    const scripts = all.filter((n) => n.nodeName === 'script');
    assert.equal(scripts.length, 1);
    assert.equal(scripts[0].attrs?.find((a) => a.name === 'nonce')?.value, NONCE);
    assert.equal(all.filter((n) => n.nodeName === 'b').length, 0, 'no element injected by the title');
  });
});
