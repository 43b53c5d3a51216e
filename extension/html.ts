/**
 * The panel's HTML shell (no vscode import, so the browser tests use the same HTML).
 * Strict content security policy: nothing by default, the script only with this render's
 * nonce, styles and images only from the built webview folder.
 */

/** What the shell needs from the host. */
export interface ShellSpec {
  /** The webview's cspSource (origin of resources served from the extension). */
  readonly cspSource: string;
  /** A fresh random nonce for this render (base64 or hex). */
  readonly nonce: string;
  readonly scriptUri: string;
  readonly styleUri: string;
  /** Page title (escaped here). */
  readonly title: string;
}

/** Escapes text for HTML element content and quoted attribute values. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);
}

/** The panel's HTML document. */
export function panelHtml(spec: ShellSpec): string {
  const csp = ["default-src 'none'", `img-src ${spec.cspSource} data:`, `style-src ${spec.cspSource}`, `font-src ${spec.cspSource}`, `script-src 'nonce-${spec.nonce}'`].join('; ');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${escapeHtml(csp)}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<link rel="stylesheet" href="${escapeHtml(spec.styleUri)}">
<title>${escapeHtml(spec.title)}</title>
</head>
<body>
<main id="knotwise-root" data-state="waiting" aria-busy="false"><p class="kw-muted">Waiting for the analysis…</p></main>
<script nonce="${escapeHtml(spec.nonce)}" src="${escapeHtml(spec.scriptUri)}"></script>
</body>
</html>
`;
}
