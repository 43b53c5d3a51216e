/**
 * The webview side of the host connection: VS Code injects acquireVsCodeApi (the tests
 * stub it). Messages are typed by core/protocol.ts.
 */
import type { PanelMessage } from '../core/protocol';

/** What the panel keeps across reloads of the webview. */
export interface SavedState {
  readonly runId: number;
  readonly rule: unknown;
}

interface VsCodeApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): VsCodeApi;

/** Typed wrapper around the host API (acquireVsCodeApi may be called only once). */
export interface Host {
  post(message: PanelMessage): void;
  loadState(): SavedState | undefined;
  saveState(state: SavedState): void;
}

/** Connects to the host. */
export function connectHost(): Host {
  const api = acquireVsCodeApi();
  return {
    post: (m) => api.postMessage(m),
    loadState: () => {
      const s = api.getState() as SavedState | undefined;
      return s && typeof s.runId === 'number' ? s : undefined;
    },
    saveState: (s) => api.setState(s),
  };
}
