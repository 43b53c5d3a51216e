// Runs in the panel page before its own script (page.addInitScript): stands in for the
// API VS Code injects into webviews, records CSP violations, and applies the theme name
// the test asked for (window.name carries it across the navigation). The saved state is
// readable as window.__knotwiseState() for the tests.
(() => {
  window.__knotwiseCsp = [];
  document.addEventListener('securitypolicyviolation', (e) => window.__knotwiseCsp.push(`${e.violatedDirective} ${e.blockedURI}`));
  let state;
  window.acquireVsCodeApi = () => ({
    postMessage: (m) => window.__knotwiseToHost(m),
    getState: () => state,
    setState: (s) => {
      state = s;
    },
  });
  window.__knotwiseState = () => state;
  const theme = new URLSearchParams(location.search).get('theme') || 'light';
  document.addEventListener('DOMContentLoaded', () => {
    document.documentElement.dataset.theme = theme;
    document.body.classList.add(`vscode-${theme}`);
  });
})();
