// Types of e2e-workbench.mjs for the TypeScript tests that import it.
import type { BrowserContext, Page } from 'playwright-core';

export declare const repoRoot: string;
export declare const artifactsDir: string;
export declare function freshRunDir(prefix: string): string;
export declare function isLocalUrl(url: string): boolean;
export declare function isWebviewResourceUrl(url: string): boolean;
export interface LaunchedChromium {
  readonly context: BrowserContext;
  readonly page: Page;
  readonly blocked: string[];
  /** Webview resource requests that missed the workbench's service worker (aborted). */
  readonly missedWorker: string[];
  close(): Promise<void>;
}
export declare function launchChromium(options?: { viewport?: { width: number; height: number } }): Promise<LaunchedChromium>;
export declare function freePort(): Promise<number>;
export declare function chromiumInstalled(): boolean;
export declare function codeServerInstalled(): boolean;
export interface CodeServer {
  readonly port: number;
  /** code-server's process id, which is also its process group's. */
  readonly pid: number;
  readonly origin: string;
  readonly log: string[];
  workbenchUrl(folder: string, payload?: readonly (readonly [string, string])[]): string;
  remotePath(absPath: string): string;
  stop(): Promise<void>;
}
export declare function installVsix(runDir: string, vsix: string): string;
export declare function startCodeServer(options: { runDir: string; settings?: Record<string, unknown>; timeoutMs?: number }): Promise<CodeServer>;
export declare function seconds(t0: number): string;
