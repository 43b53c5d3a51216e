/**
 * One webview panel per CSV file: strict CSP with a fresh nonce per render, resources only
 * from dist/webview, messages checked against the protocol. Messages sent before the
 * panel's script is listening are kept (the latest state only) and sent on `ready`.
 */
import { randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import { isPanelMessage, type HostMessage, type PanelMessage } from '../core/protocol';
import { panelHtml } from './html';

/** A Knotwise panel showing one file's runs. */
export class PanelView implements vscode.Disposable {
  private readonly panel: vscode.WebviewPanel;
  private ready = false;
  /** Latest result and the latest status after it, re-sent when the webview (re)loads. */
  private lastResult: HostMessage | undefined;
  private lastStatus: HostMessage | undefined;
  private readonly subscriptions: vscode.Disposable[] = [];
  private closed = false;

  constructor(
    extensionUri: vscode.Uri,
    title: string,
    private readonly onMessage: (m: PanelMessage) => void,
    private readonly onClose: () => void,
  ) {
    const root = vscode.Uri.joinPath(extensionUri, 'dist', 'webview');
    this.panel = vscode.window.createWebviewPanel('knotwise.curveReview', title, { viewColumn: vscode.ViewColumn.Beside, preserveFocus: false }, {
      enableScripts: true,
      localResourceRoots: [root],
      retainContextWhenHidden: false,
    });
    const webview = this.panel.webview;
    webview.html = panelHtml({
      cspSource: webview.cspSource,
      nonce: randomBytes(18).toString('base64'),
      scriptUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'main.js')).toString(),
      styleUri: webview.asWebviewUri(vscode.Uri.joinPath(root, 'main.css')).toString(),
      title,
    });
    this.subscriptions.push(
      webview.onDidReceiveMessage((m: unknown) => {
        if (!isPanelMessage(m)) return;
        if (m.type === 'ready') {
          this.ready = true;
          if (this.lastResult) void webview.postMessage(this.lastResult);
          if (this.lastStatus) void webview.postMessage(this.lastStatus);
        }
        this.onMessage(m);
      }),
      this.panel.onDidChangeViewState(() => {
        // A hidden webview is unloaded; it says `ready` again when shown.
        if (!this.panel.visible) this.ready = false;
      }),
      this.panel.onDidDispose(() => {
        this.closed = true;
        this.onClose();
      }),
    );
  }

  /** True once the panel was closed by the person. */
  get isClosed(): boolean {
    return this.closed;
  }

  /** Sends a message now, or when the panel's script is ready. */
  post(message: HostMessage): void {
    if (this.closed) return;
    if (message.type === 'result') {
      this.lastResult = message;
      this.lastStatus = undefined;
    } else if (message.type === 'running' || message.type === 'failed') {
      this.lastStatus = message;
    }
    if (this.ready) void this.panel.webview.postMessage(message);
  }

  reveal(): void {
    if (!this.closed) this.panel.reveal(undefined, true);
  }

  setTitle(title: string): void {
    if (!this.closed) this.panel.title = title;
  }

  dispose(): void {
    for (const s of this.subscriptions) s.dispose();
    if (!this.closed) this.panel.dispose();
  }
}
