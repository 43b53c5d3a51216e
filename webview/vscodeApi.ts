/**
 * The webview side of the host connection: VS Code injects acquireVsCodeApi (the tests
 * stub it). Messages are typed by core/protocol.ts; the saved state is a PanelState,
 * checked when read back.
 */
import { isPanelState, type PanelMessage, type PanelState } from '../core/protocol';

interface VsCodeApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): VsCodeApi;

/** Typed wrapper around the host API (acquireVsCodeApi may be called only once). */
export interface Host {
  post(message: PanelMessage): void;
  loadState(): PanelState | undefined;
  saveState(state: PanelState): void;
}

/** Connects to the host. */
export function connectHost(): Host {
  const api = acquireVsCodeApi();
  return {
    post: (m) => api.postMessage(m),
    loadState: () => {
      const s = api.getState();
      return isPanelState(s) ? s : undefined;
    },
    saveState: (s) => api.setState(s),
  };
}
