/**
 * Serves the real panel HTML (extension/html.ts, with its CSP and nonce) and the bundled
 * script from 127.0.0.1, opens it in headless Chromium with a stubbed acquireVsCodeApi,
 * and plays the host: messages are posted into the page, the panel's messages come back
 * through an exposed function, and detail requests are answered from the real analysis.
 */
import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import type { HostMessage, PanelMessage } from '../../core/protocol';
import { detailFor } from '../../core/view/payload';
import { panelHtml } from '../../extension/html';
import type { LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };
import type { Fixture } from './fixture';

const distDir = join(__dirname, '..', '..', 'dist', 'webview');
/** Upper bound of every wait for the panel (a failure report, not a pause: waits end as soon as their condition holds). */
const WAIT_LIMIT_MS = 10000;

/** The few browser globals the page functions below use (this file compiles without the DOM library). */
interface PageWindow {
  addEventListener(type: 'message', listener: (e: { readonly data: unknown }) => void, options: { readonly signal: AbortSignal }): void;
  postMessage(message: unknown, targetOrigin: string): void;
  readonly document: { querySelector(selector: string): { readonly textContent: string | null } | null };
}

/** A page showing the panel, and what happened in it. */
export interface PanelPage {
  readonly page: Page;
  /** Messages the panel sent, in order. */
  readonly sent: PanelMessage[];
  /** Dialogs (alert, confirm, ...) the page tried to open. */
  readonly dialogs: string[];
  /** Content-security-policy violations reported by the page. */
  readonly cspViolations: () => Promise<string[]>;
  /**
   * Posts a message into the panel as the host does, and resolves once the page has
   * dispatched it to every listener (the panel has handled it or dropped it).
   */
  send(message: unknown): Promise<void>;
  /** As `send`, with the message parsed from JSON text inside the page (keys such as "__proto__" stay own keys). */
  sendJson(text: string): Promise<void>;
  /** Waits until the panel sent a message of type `type` (after `from` messages). */
  waitForSent(type: PanelMessage['type'], from?: number): Promise<PanelMessage>;
  /** Waits until the text of `selector` equals `want` (a string) or matches it (a RegExp); returns the text. */
  waitForText(selector: string, want: string | RegExp): Promise<string>;
}

/** A local server for the panel files. */
export interface PanelServer {
  readonly origin: string;
  close(): Promise<void>;
}

/** Starts the panel's file server on a free loopback port. */
export async function startPanelServer(): Promise<PanelServer> {
  let origin = '';
  const server: Server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', origin);
    if (url.pathname === '/') {
      const nonce = randomBytes(16).toString('base64');
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
      res.end(panelHtml({ cspSource: origin, nonce, scriptUri: `${origin}/main.js`, styleUri: `${origin}/main.css`, title: 'Knotwise panel test' }));
      return;
    }
    if (url.pathname === '/main.js' || url.pathname === '/main.css' || url.pathname === '/theme.css') {
      const type = url.pathname.endsWith('.js') ? 'text/javascript' : 'text/css';
      const file = url.pathname === '/theme.css' ? join(__dirname, 'theme.css') : join(distDir, url.pathname.slice(1));
      res.writeHead(200, { 'content-type': type });
      res.end(readFileSync(file));
      return;
    }
    res.writeHead(404);
    res.end();
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const addr = server.address();
  origin = `http://127.0.0.1:${typeof addr === 'object' && addr ? addr.port : 0}`;
  return { origin, close: () => new Promise<void>((r) => server.close(() => r())) };
}

/** Stand-ins for VS Code's default light, dark and high-contrast (dark) themes, for screenshots outside the editor (theme.css). */
export type Theme = 'light' | 'dark' | 'high-contrast';

/** How to open the panel page. */
export interface OpenOptions {
  readonly theme?: Theme;
  /** The state the webview starts with, as VS Code hands a reloaded webview what it saved. */
  readonly state?: unknown;
  /** The page's size in CSS pixels (default: the browser context's). */
  readonly viewport?: { readonly width: number; readonly height: number };
}

/** Opens the panel page, installs the stub host and waits for the panel's `ready`. */
export async function openPanel(browser: LaunchedChromium, server: PanelServer, fixture: Fixture | undefined, options: OpenOptions = {}): Promise<PanelPage> {
  const { theme = 'light' } = options;
  const page = await browser.context.newPage();
  if (options.viewport) await page.setViewportSize({ ...options.viewport });
  page.setDefaultTimeout(WAIT_LIMIT_MS);
  const sent: PanelMessage[] = [];
  const waiters = new Set<() => void>();
  const dialogs: string[] = [];
  page.on('dialog', (d) => {
    dialogs.push(`${d.type()}: ${d.message()}`);
    void d.dismiss();
  });
  let marks = 0;
  const post = async (message: unknown, asJson = false): Promise<void> => {
    // Message events are dispatched in the order they were posted, each to every listener
    // before the next: once a mark posted after `message` arrives here, the panel's listener
    // (registered when its script started) has finished with `message`.
    const mark = `knotwise-test-mark-${++marks}`;
    await page.evaluate(
      ([m, k, json]) =>
        new Promise<void>((resolve) => {
          // No named functions in here: the test compiler would wrap them in a helper the page lacks.
          const w = globalThis as unknown as PageWindow;
          const done = new AbortController();
          w.addEventListener(
            'message',
            (e) => {
              if (e.data !== k) return;
              done.abort();
              resolve();
            },
            { signal: done.signal },
          );
          w.postMessage(json ? JSON.parse(m as string) : m, '*');
          w.postMessage(k, '*');
        }),
      [message, mark, asJson] as const,
    );
  };
  await page.exposeFunction('__knotwiseToHost', (m: PanelMessage) => {
    sent.push(m);
    for (const wake of [...waiters]) wake();
    if (m.type === 'needDetail' && fixture && m.runId === fixture.payload.runId) {
      const detail = detailFor(fixture.analysis, m.df);
      if (detail) void post({ type: 'detail', runId: m.runId, detail } satisfies HostMessage);
    }
  });
  await page.addInitScript({ path: join(__dirname, 'stub.js') });
  const query = new URLSearchParams({ theme, ...(options.state !== undefined ? { state: JSON.stringify(options.state) } : {}) });
  await page.goto(`${server.origin}/?${query.toString()}`);
  await page.addStyleTag({ url: `${server.origin}/theme.css` });
  const pp: PanelPage = {
    page,
    sent,
    dialogs,
    cspViolations: () => page.evaluate('window.__knotwiseCsp') as Promise<string[]>,
    send: (m) => post(m),
    sendJson: (text) => post(text, true),
    waitForSent(type, from = 0) {
      const find = (): PanelMessage | undefined => sent.slice(from).find((s) => s.type === type);
      const now = find();
      if (now) return Promise.resolve(now);
      // Woken by each message the panel sends; the page's default timeout bounds the wait.
      return new Promise<PanelMessage>((resolve, reject) => {
        const wake = (): void => {
          const m = find();
          if (!m) return;
          settle();
          resolve(m);
        };
        const onClose = (): void => {
          settle();
          reject(new Error(`the page closed before the panel sent "${type}" (sent: ${sent.map((s) => s.type).join(', ')})`));
        };
        const timer = setTimeout(() => {
          settle();
          reject(new Error(`the panel did not send "${type}" (sent: ${sent.map((s) => s.type).join(', ')})`));
        }, WAIT_LIMIT_MS);
        const settle = (): void => {
          clearTimeout(timer);
          waiters.delete(wake);
          page.off('close', onClose);
        };
        waiters.add(wake);
        page.on('close', onClose);
      });
    },
    async waitForText(selector, want) {
      const source = typeof want === 'string' ? { text: want } : { re: want.source, flags: want.flags };
      try {
        await page.waitForFunction(
          ([sel, w]) => {
            const t = (globalThis as unknown as PageWindow).document.querySelector(sel)?.textContent ?? '';
            return 'text' in w ? t === w.text : new RegExp(w.re, w.flags).test(t);
          },
          [selector, source] as const,
        );
      } catch (err) {
        const now = await page.textContent(selector).catch(() => null);
        throw new Error(`${selector} never read ${String(want)} (it reads ${JSON.stringify(now)})`, { cause: err });
      }
      return (await page.textContent(selector)) ?? '';
    },
  };
  await pp.waitForSent('ready');
  return pp;
}

/** Asserts that the box of each selector lies within [0, width]: nothing is cut off at the page's right edge. */
export async function assertWithinWidth(page: Page, selectors: readonly string[], width: number): Promise<void> {
  for (const selector of selectors) {
    const b = await page.locator(selector).boundingBox();
    if (!(b && b.x >= 0 && b.x + b.width <= width)) throw new Error(`${selector} does not fit the width ${width} (${JSON.stringify(b)})`);
  }
}

/**
 * Colours as the page resolves them: `values` maps a name to a CSS colour value (e.g.
 * 'var(--vscode-charts-blue)', read through a probe element), `styles` a name to an element's
 * selector and a computed style property (e.g. ['#fig path.kw-selected', 'stroke']).
 */
export async function resolvedColours(page: Page, values: Readonly<Record<string, string>>, styles: Readonly<Record<string, readonly [string, string]>>): Promise<Record<string, string>> {
  // A string, so the test's own type check needs no DOM types.
  return (await page.evaluate(`(() => {
    const out = {};
    const probe = document.createElement('span');
    document.body.append(probe);
    for (const [name, value] of Object.entries(${JSON.stringify(values)})) {
      probe.style.color = value;
      out[name] = getComputedStyle(probe).color;
    }
    probe.remove();
    for (const [name, [selector, property]] of Object.entries(${JSON.stringify(styles)})) out[name] = getComputedStyle(document.querySelector(selector))[property];
    return out;
  })()`)) as Record<string, string>;
}
