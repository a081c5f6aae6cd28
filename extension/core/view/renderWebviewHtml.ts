/** Inputs of the viewer page; every string is interpolated escaped. */
export interface WebviewHtmlInput {
  /** `webview.cspSource`, e.g. `https://*.vscode-cdn.net` or `vscode-webview-resource:`. */
  readonly cspSource: string;
  /** Fresh per render; base64/UUID characters only (letters, digits, `+/=-`). */
  readonly nonce: string;
  readonly scriptUri: string;
  readonly styleUris: readonly string[];
  readonly title: string;
}

const NONCE_PATTERN = /^[A-Za-z0-9+/=-]{16,}$/;
/** CSP3 §2.3.1 host-source / scheme-source (no quotes, `;` or `,`), or the keyword 'self'. */
const SOURCE_PATTERN = /^(?:'self'|[A-Za-z][A-Za-z0-9+.-]*:(?:\/\/[^\s;,'"]*)?|(?:\*\.)?[A-Za-z0-9.-]+(?::\d+)?(?:\/[^\s;,'"]*)?)$/;

/** Escape for HTML text and double-quoted attribute values (HTML Living Standard §13.1.2.3). */
export function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/**
 * The Content-Security-Policy for the viewer: nothing by default; scripts only with the nonce;
 * styles, images and fonts only from the extension's own resource origin (`cspSource`), plus
 * `data:` images (chart export). chart.js draws on canvas and sets sizes through the CSSOM,
 * which style-src does not govern, so no 'unsafe-inline' is needed; @vscode-elements uses
 * constructable stylesheets (adoptedStyleSheets), likewise outside style-src.
 * `cspSource` may hold several source expressions separated by spaces (the web editor gives
 * `'self' https://…`). Throws when the nonce or cspSource could break out of the header.
 */
export function buildContentSecurityPolicy(cspSource: string, nonce: string): string {
  if (!NONCE_PATTERN.test(nonce)) {
    throw new Error(`expected a nonce of at least 16 base64/UUID characters, got ${JSON.stringify(nonce)}`);
  }
  // VS Code desktop gives one host-source; the web build (code-server 4.100 = VS Code 1.100.3) gives
  // "'self' https://*.vscode-cdn.net". Accept a list of source expressions, nothing that ends a directive.
  const sources = cspSource.trim().split(/[ \t]+/);
  if (cspSource.trim().length === 0 || !sources.every((source) => SOURCE_PATTERN.test(source))) {
    throw new Error(`expected CSP source expressions (host/scheme sources or 'self'), got ${JSON.stringify(cspSource)}`);
  }
  return [
    "default-src 'none'",
    `script-src 'nonce-${nonce}'`,
    `style-src ${sources.join(' ')}`,
    `img-src ${sources.join(' ')} data:`,
    `font-src ${sources.join(' ')}`,
  ].join('; ');
}

/**
 * The complete HTML document of the metric viewer: CSP meta first (so it applies to everything
 * after it), the stylesheets, a static skeleton the script fills, and one nonce'd module script.
 * Returns a string; throws only on a malformed nonce/cspSource (see buildContentSecurityPolicy).
 */
export function renderWebviewHtml(input: WebviewHtmlInput): string {
  const csp = buildContentSecurityPolicy(input.cspSource, input.nonce);
  const styles = input.styleUris.map((uri) => `<link rel="stylesheet" href="${escapeHtml(uri)}">`).join('\n    ');
  return `<!DOCTYPE html>
<html lang="en">
  <head>
    <meta charset="UTF-8">
    <meta http-equiv="Content-Security-Policy" content="${escapeHtml(csp)}">
    <meta name="viewport" content="width=device-width, initial-scale=1.0">
    ${styles}
    <title>${escapeHtml(input.title)}</title>
  </head>
  <body>
    <main id="app" aria-busy="true">
      <p id="loading" role="status">Reading the export…</p>
    </main>
    <script nonce="${escapeHtml(input.nonce)}" src="${escapeHtml(input.scriptUri)}"></script>
  </body>
</html>
`;
}
