/**
 * Entry point of the panel's script (bundled to dist/webview/main.js). Waits for the
 * host's messages and tells the host it is ready once it listens.
 */
import './style.css';
import type { HostMessage } from '../core/protocol';
import { Panel } from './panel';
import { connectHost } from './vscodeApi';

const HOST_MESSAGE_TYPES = new Set<HostMessage['type']>(['running', 'result', 'failed', 'detail', 'saved', 'saveFailed']);

function isHostMessage(m: unknown): m is HostMessage {
  return typeof m === 'object' && m !== null && HOST_MESSAGE_TYPES.has((m as { type: HostMessage['type'] }).type);
}

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
