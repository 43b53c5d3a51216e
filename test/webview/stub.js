// Runs in the panel page before its own script (page.addInitScript): stands in for the
// API VS Code injects into webviews, records CSP violations, and applies the theme name
// the test asked for (the page's query string carries it, and the saved state a reloaded
// webview starts with). The saved state is readable as window.__knotwiseState() for the tests.
(() => {
  window.__knotwiseCsp = [];
  document.addEventListener('securitypolicyviolation', (e) => window.__knotwiseCsp.push(`${e.violatedDirective} ${e.blockedURI}`));
  const params = new URLSearchParams(location.search);
  let state = params.has('state') ? JSON.parse(params.get('state')) : undefined;
  window.acquireVsCodeApi = () => ({
    postMessage: (m) => window.__knotwiseToHost(m),
    getState: () => state,
    setState: (s) => {
      state = s;
    },
  });
  window.__knotwiseState = () => state;
  const theme = params.get('theme') || 'light';
  document.addEventListener('DOMContentLoaded', () => {
    document.documentElement.dataset.theme = theme;
    document.body.classList.add(`vscode-${theme}`);
  });
})();
