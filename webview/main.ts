/**
 * Entry point of the panel's script (bundled to dist/webview/main.js). Waits for the
 * host's messages, drops anything the protocol's guard refuses, and tells the host it is
 * ready once it listens.
 */
import './style.css';
import { isHostMessage } from '../core/protocol';
import { Panel } from './panel';
import { connectHost } from './vscodeApi';

const root = document.getElementById('knotwise-root');
if (root) {
  const host = connectHost();
  const panel = new Panel(root, host);
  window.addEventListener('message', (event: MessageEvent<unknown>) => {
    if (!isHostMessage(event.data)) return;
    try {
      panel.handle(event.data);
    } catch (err) {
      root.dataset.error = err instanceof Error ? err.message : String(err);
      console.error('Knotwise panel:', err);
    }
  });
  host.post({ type: 'ready' });
}
