/**
 * One webview panel per CSV file: strict CSP with a fresh nonce per render, resources only
 * from dist/webview, messages checked against the protocol. Messages sent before the
 * panel's script is listening are kept (the latest of each kind) and sent on `ready`:
 * the file, a grouped run's overview, the result, the data state and the status after it. A panel restored after a
 * window reload is adopted rather than created.
 */
import { randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import { isPanelMessage, type HostMessage, type PanelMessage } from '../core/protocol';
import { DisposableStore } from './disposables';
import { panelHtml } from './html';

/** The view type of Knotwise's panels (also in package.json's activation events). */
export const PANEL_VIEW_TYPE = 'knotwise.curveReview';

/** How many of the latest messages a panel keeps for the API (tests read them). */
const LOG_LENGTH = 64;

/** A Knotwise panel showing one file's runs. */
export class PanelView implements vscode.Disposable {
  private readonly panel: vscode.WebviewPanel;
  private ready = false;
  /** Settles once the messages posted so far have been handed to the page (see delivered). */
  private delivery: Promise<void> = Promise.resolve();
  /** Settles `delivery` when the page says it is ready, or when the panel closes before. */
  private onReady: (() => void) | undefined;
  /** The file, the latest result, its data state and the latest status after it, re-sent when the webview (re)loads. */
  private lastFile: HostMessage | undefined;
  private lastResult: HostMessage | undefined;
  /** The overview of a grouped run, re-sent before its group's result. */
  private lastGroups: HostMessage | undefined;
  private lastDataState: HostMessage | undefined;
  private lastStatus: HostMessage | undefined;
  /** The latest messages posted, oldest first. */
  readonly log: HostMessage[] = [];
  private readonly subscriptions = new DisposableStore();
  private closed = false;

  constructor(
    extensionUri: vscode.Uri,
    title: string,
    private readonly onMessage: (m: PanelMessage) => void,
    private readonly onClose: () => void,
    /** A panel the window restored after a reload (see the serializer in controller.ts). */
    restored?: vscode.WebviewPanel,
  ) {
    const root = vscode.Uri.joinPath(extensionUri, 'dist', 'webview');
    const options = { enableScripts: true, localResourceRoots: [root] };
    if (restored) {
      this.panel = restored;
      restored.title = title;
      restored.webview.options = options;
    } else {
      this.panel = vscode.window.createWebviewPanel(PANEL_VIEW_TYPE, title, { viewColumn: vscode.ViewColumn.Beside, preserveFocus: false }, { ...options, retainContextWhenHidden: false });
    }
    const webview = this.panel.webview;
    webview.html = panelHtml({
      cspSource: webview.cspSource,
      nonce: randomBytes(18).toString('base64'),
      scriptUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'main.js')).toString(),
      styleUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'main.css')).toString(),
      title,
    });
    this.subscriptions.add(
      webview.onDidReceiveMessage((m: unknown) => {
        if (!isPanelMessage(m)) return;
        if (m.type === 'ready') {
          this.ready = true;
          for (const kept of [this.lastFile, this.lastGroups, this.lastResult, this.lastDataState, this.lastStatus]) if (kept) this.send(kept);
          this.onReady?.();
          this.onReady = undefined;
        }
        this.onMessage(m);
      }),
    );
    this.subscriptions.add(
      this.panel.onDidChangeViewState(() => {
        // A hidden webview is unloaded; it says `ready` again when shown.
        if (!this.panel.visible) this.ready = false;
      }),
    );
    this.subscriptions.add(
      this.panel.onDidDispose(() => {
        this.closed = true;
        this.onReady?.();
        this.onReady = undefined;
        this.onClose();
      }),
    );
  }

  /** True once the panel was closed by the person. */
  get isClosed(): boolean {
    return this.closed;
  }

  /** The editor column the panel is in (undefined when closed or not shown). */
  get viewColumn(): vscode.ViewColumn | undefined {
    return this.closed ? undefined : this.panel.viewColumn;
  }

  /** Whether the panel's script has loaded and said it is listening. */
  get isReady(): boolean {
    return this.ready;
  }

  /** Sends a message now, or when the panel's script is ready. */
  post(message: HostMessage): void {
    if (this.closed) return;
    switch (message.type) {
      case 'file':
        this.lastFile = message;
        break;
      case 'result':
      case 'groupResult':
      case 'surface':
        if (message.type !== 'groupResult') this.lastGroups = undefined;
        this.lastResult = message;
        this.lastDataState = undefined;
        this.lastStatus = undefined;
        break;
      case 'groups':
        this.lastGroups = message;
        break;
      case 'dataState':
        this.lastDataState = message;
        break;
      case 'running':
      case 'failed':
        this.lastStatus = message;
        break;
      default:
        break;
    }
    this.log.push(message);
    if (this.log.length > LOG_LENGTH) this.log.splice(0, this.log.length - LOG_LENGTH);
    if (this.ready) this.send(message);
    else if (!this.onReady) this.delivery = new Promise<void>((resolve) => (this.onReady = resolve));
  }

  /** Posts to the page now; `delivery` then waits for the page to have it. */
  private send(message: HostMessage): void {
    const sent = Promise.resolve(this.panel.webview.postMessage(message)).then(
      () => undefined,
      () => undefined,
    );
    const before = this.delivery;
    this.delivery = before.then(() => sent);
  }

  /**
   * Settles once every message posted so far has been handed to the panel's page (or the
   * panel closed): after it, work that holds the extension host's thread no longer holds
   * those messages back. A panel whose page is not ready yet settles when it is.
   */
  delivered(): Promise<void> {
    return this.delivery;
  }

  reveal(): void {
    if (!this.closed) this.panel.reveal(undefined, true);
  }

  setTitle(title: string): void {
    if (!this.closed) this.panel.title = title;
  }

  dispose(): void {
    this.subscriptions.dispose();
    if (!this.closed) this.panel.dispose();
    this.closed = true;
  }
}
