// Shared parts of the browser-driven test layers: headless Chromium through playwright-core
// with every request outside 127.0.0.1 blocked and recorded, and a code-server workbench
// (VS Code 1.100.3 for the web) started in a fresh run folder. See docs/testing.md, "Offline workbench".
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..');
export const artifactsDir = join(repoRoot, 'test-artifacts');
const codeServerEntry = join(repoRoot, '.e2e', 'cs', 'node_modules', 'code-server', 'out', 'node', 'entry.js');

const chromiumPath = process.env.KNOTWISE_CHROMIUM ?? '/usr/bin/chromium';
const chromiumArgs = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--disable-dev-shm-usage',
];

/** A fresh folder under .e2e/runs for one test run. */
export function freshRunDir(prefix) {
  const base = join(repoRoot, '.e2e', 'runs');
  mkdirSync(base, { recursive: true });
  return mkdtempSync(join(base, `${prefix}-`));
}

/** True for URLs that stay on this machine's loopback address (or are browser-internal). */
export function isLocalUrl(url) {
  if (/^(data|blob|about|chrome|devtools|chrome-extension):/.test(url)) return true;
  try {
    const u = new URL(url);
    return u.hostname === '127.0.0.1';
  } catch {
    return false;
  }
}

/**
 * Launches headless Chromium with a fresh profile. Every request whose host is not
 * 127.0.0.1 is aborted and recorded in `blocked`; the caller fails its run when it is not
 * empty. Returns { context, page, blocked, close }.
 */
export async function launchChromium({ viewport = { width: 1400, height: 900 } } = {}) {
  const profile = freshRunDir('chromium');
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath,
    headless: true,
    args: chromiumArgs,
    viewport,
  });
  const blocked = [];
  const missedWorker = [];
  await context.route('**/*', (route) => {
    const url = route.request().url();
    if (isLocalUrl(url)) return route.continue();
    (isWebviewResourceUrl(url) ? missedWorker : blocked).push(url);
    return route.abort('blockedbyclient');
  });
  // Requests that a page's service worker answers itself (VS Code serves webview resources
  // from a virtual *.vscode-resource host that way) never reach the network and are not
  // routed; everything that would reach the network passes the route above. Web sockets
  // are not routed: watch them separately.
  const page = context.pages()[0] ?? (await context.newPage());
  context.on('page', (p) => watchSockets(p, blocked));
  watchSockets(page, blocked);
  return {
    context,
    page,
    blocked,
    missedWorker,
    async close() {
      await context.close().catch(() => {});
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/**
 * True for the workbench's virtual host of webview resources (`asWebviewUri` gives
 * https://<authority>.vscode-resource.vscode-cdn.net/<path>). The webview's service worker
 * answers these; a request that reaches the route was made while no service worker
 * controlled the frame (a race inside the workbench, seen when a panel closes during its
 * first load). It is aborted like any other and listed in `missedWorker`, which the layers
 * print but do not count as a request of Knotwise's: the extension never chooses this host.
 */
export function isWebviewResourceUrl(url) {
  try {
    return new URL(url).hostname.endsWith('.vscode-resource.vscode-cdn.net');
  } catch {
    return false;
  }
}

function watchSockets(page, blocked) {
  page.on('websocket', (ws) => {
    if (!isLocalUrl(ws.url().replace(/^ws/, 'http'))) blocked.push(ws.url());
  });
}

/** An unused TCP port on 127.0.0.1. */
export function freePort() {
  return new Promise((res, rej) => {
    const srv = createServer();
    srv.unref();
    srv.on('error', rej);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      srv.close(() => res(typeof addr === 'object' && addr ? addr.port : 0));
    });
  });
}

/** True when the Chromium that launchChromium starts is there (Debian's, or KNOTWISE_CHROMIUM). */
export function chromiumInstalled() {
  return existsSync(chromiumPath);
}

/** True when code-server has been installed by scripts/e2e-install.sh. */
export function codeServerInstalled() {
  return existsSync(codeServerEntry);
}

/**
 * Installs the packaged extension `vsix` into `<runDir>/extensions` the way a person does,
 * with code-server's `--install-extension` (no gallery, no network). Returns the installer's output.
 */
export function installVsix(runDir, vsix) {
  if (!codeServerInstalled()) {
    throw new Error('code-server is not installed: run `bash scripts/e2e-install.sh` first');
  }
  const extensions = join(runDir, 'extensions');
  mkdirSync(extensions, { recursive: true });
  const args = [codeServerEntry, '--install-extension', vsix, '--extensions-dir', extensions, '--user-data-dir', join(runDir, 'user-data')];
  const r = spawnSync(process.execPath, args, {
    encoding: 'utf8',
    timeout: 120000,
    env: { ...process.env, EXTENSIONS_GALLERY: '{}', HOME: runDir, TMPDIR: runDir },
  });
  const out = `${r.stdout ?? ''}${r.stderr ?? ''}`;
  if (r.status !== 0) throw new Error(`installing ${vsix} failed (exit ${r.status}):\n${out}`);
  return out;
}

/**
 * Starts code-server on a free loopback port with user data, extensions and config inside
 * `runDir`, and waits for /healthz. `settings` become the user settings.json.
 * Returns { port, pid, origin, workbenchUrl(folder, payload), log, stop() }.
 */
export async function startCodeServer({ runDir, settings = {}, timeoutMs = 60000 }) {
  if (!codeServerInstalled()) {
    throw new Error('code-server is not installed: run `bash scripts/e2e-install.sh` first');
  }
  const port = await freePort();
  const userDir = join(runDir, 'user-data', 'User');
  mkdirSync(userDir, { recursive: true });
  mkdirSync(join(runDir, 'extensions'), { recursive: true });
  writeFileSync(
    join(userDir, 'settings.json'),
    JSON.stringify(
      {
        'security.workspace.trust.enabled': false,
        'workbench.startupEditor': 'none',
        'workbench.tips.enabled': false,
        'extensions.autoCheckUpdates': false,
        'extensions.autoUpdate': false,
        'telemetry.telemetryLevel': 'off',
        'update.mode': 'none',
        'workbench.enableExperiments': false,
        'chat.commandCenter.enabled': false,
        'git.openRepositoryInParentFolders': 'never',
        ...settings,
      },
      null,
      2,
    ),
  );
  writeFileSync(join(runDir, 'config.yaml'), `bind-addr: 127.0.0.1:${port}\nauth: none\ncert: false\n`);
  const args = [
    codeServerEntry,
    '--auth',
    'none',
    '--bind-addr',
    `127.0.0.1:${port}`,
    '--config',
    join(runDir, 'config.yaml'),
    '--user-data-dir',
    join(runDir, 'user-data'),
    '--extensions-dir',
    join(runDir, 'extensions'),
    '--disable-workspace-trust',
    '--disable-telemetry',
    '--disable-update-check',
    '--disable-getting-started-override',
  ];
  const log = [];
  const child = spawn(process.execPath, args, {
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, EXTENSIONS_GALLERY: '{}', HOME: runDir, TMPDIR: runDir },
  });
  child.stdout.on('data', (d) => log.push(String(d)));
  child.stderr.on('data', (d) => log.push(String(d)));
  let exited = false;
  child.on('exit', () => {
    exited = true;
  });

  const origin = `http://127.0.0.1:${port}`;
  const stop = async () => {
    if (exited) return;
    try {
      process.kill(-child.pid, 'SIGTERM');
    } catch {
      return;
    }
    const deadline = Date.now() + 4000;
    while (!exited && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
    try {
      process.kill(-child.pid, 'SIGKILL');
    } catch {
      /* already gone */
    }
  };

  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (exited) throw new Error(`code-server exited early:\n${log.join('')}`);
    try {
      const res = await fetch(`${origin}/healthz`);
      if (res.status === 200) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) {
      await stop();
      throw new Error(`code-server did not answer /healthz within ${timeoutMs} ms:\n${log.join('')}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }

  return {
    port,
    /** code-server's process id, which is also its process group's (the extension host is in that group). */
    pid: child.pid,
    origin,
    log,
    /** The workbench URL for a folder, with optional development payload entries. */
    workbenchUrl(folder, payload) {
      let url = `${origin}/?folder=${encodeURIComponent(folder)}`;
      if (payload && payload.length > 0) url += `&payload=${encodeURIComponent(JSON.stringify(payload))}`;
      return url;
    },
    /** `vscode-remote://` form of an absolute path on this machine, for payload entries. */
    remotePath(absPath) {
      return `vscode-remote://127.0.0.1:${port}${absPath}`;
    },
    stop,
  };
}

/** Milliseconds since `t0`, formatted in seconds. */
export function seconds(t0) {
  return `${((Date.now() - t0) / 1000).toFixed(1)} s`;
}
