/**
 * Every fit record in the workspace, watched: a record is out of date when its data file
 * or one of its outputs (the curve table and any other file it lists) is no longer the
 * bytes whose SHA-256 it names. The check is cheap: a file's size and modification time
 * first, and its bytes are hashed only when those are new; the first look at a record
 * hashes only files newer than the record itself (Knotwise writes the record last).
 * Records out of date get a Problems entry on the record file and count in a status bar
 * item, whose command offers to refit and save, open the review, or show what changed.
 * The scan starts after activation, off the activation path; watchers follow the records
 * and the files they name.
 */
import * as vscode from 'vscode';
import { RECORD_FORMAT } from '../core/outputs/record';
import { isNotFound, sha256 } from './csvSource';
import { DisposableStore } from './disposables';

/** The command of the status bar item (also in package.json). */
export const STALE_COMMAND = 'knotwise.showStaleTables';

/** Where a record's files are and which bytes it names. */
interface RecordFiles {
  readonly data: { readonly uri: vscode.Uri; readonly name: string; readonly sha256: string };
  readonly outputs: readonly { readonly uri: vscode.Uri; readonly name: string; readonly sha256: string }[];
  /** The columns as recorded (for a refit from the editor). */
  readonly columns: { readonly x: string; readonly y: string; readonly weights?: string; readonly trials?: string };
}

/** What the watch knows of one record. */
interface Entry {
  files: RecordFiles | undefined;
  /** Why the record is out of date (empty: current). */
  reasons: string[];
}

/** A stale record as the API shows it. */
export interface StaleRecord {
  readonly record: string;
  readonly data: string;
  readonly reasons: readonly string[];
}

/** The status bar text for `n` stale records (undefined: hidden). */
export function staleText(n: number): string | undefined {
  return n === 0 ? undefined : `$(warning) ${n} curve table${n === 1 ? '' : 's'} out of date`;
}

/** A path from a record ('/'-separated, relative to the record's folder, or absolute) as a URI. */
function resolvePath(folder: vscode.Uri, path: string): vscode.Uri {
  return path.startsWith('/') ? folder.with({ path }) : vscode.Uri.joinPath(folder, path);
}

const isText = (v: unknown): v is string => typeof v === 'string' && v.length > 0 && v.length < 4096;

/** The files a record names, or undefined when the bytes are not a Knotwise fit record. */
export function recordFiles(recordUri: vscode.Uri, bytes: Uint8Array): RecordFiles | undefined {
  let rec: unknown;
  try {
    rec = JSON.parse(new TextDecoder().decode(bytes));
  } catch {
    return undefined;
  }
  const o = rec as { format?: unknown; data?: Record<string, unknown>; table?: Record<string, unknown>; outputs?: unknown };
  if (typeof o !== 'object' || o === null || o.format !== RECORD_FORMAT || !o.data || !o.table) return undefined;
  const { data, table } = o;
  if (!isText(data.path) || !isText(data.sha256) || !isText(table.file) || !isText(table.sha256)) return undefined;
  const folder = vscode.Uri.joinPath(recordUri, '..');
  const outputs = [{ file: table.file, sha256: table.sha256 }, ...(Array.isArray(o.outputs) ? (o.outputs as { file?: unknown; sha256?: unknown }[]) : [])]
    .filter((e): e is { file: string; sha256: string } => isText(e.file) && isText(e.sha256) && !e.file.includes('..') && !e.file.startsWith('/'))
    .map((e) => ({ uri: vscode.Uri.joinPath(folder, e.file), name: e.file, sha256: e.sha256 }));
  const cols = (data.columns ?? {}) as Record<string, unknown>;
  if (!isText(cols.x) || !isText(cols.y)) return undefined;
  return {
    data: { uri: resolvePath(folder, data.path), name: data.path, sha256: data.sha256 },
    outputs,
    columns: { x: cols.x, y: cols.y, ...(isText(cols.weights) ? { weights: cols.weights } : {}), ...(isText(cols.trials) ? { trials: cols.trials } : {}) },
  };
}

/** The size, modification time and (once read) SHA-256 of a file. */
interface Stamp {
  readonly size: number;
  readonly mtime: number;
  sha256?: string;
}

/** Watches the workspace's fit records. */
export class RecordWatch implements vscode.Disposable {
  private readonly store = new DisposableStore();
  private readonly diagnostics = this.store.add(vscode.languages.createDiagnosticCollection('knotwise-records'));
  private readonly status = this.store.add(vscode.window.createStatusBarItem('knotwise.staleTables', vscode.StatusBarAlignment.Left, 50));
  private readonly entries = new Map<string, Entry>();
  private readonly stamps = new Map<string, Stamp>();
  /** Per-file watchers of the files records name, by URI. */
  private readonly fileWatchers = new Map<string, vscode.Disposable>();
  /** Records naming each watched file, by the file's URI. */
  private readonly namedBy = new Map<string, Set<string>>();
  private queue: Promise<void> = Promise.resolve();
  private started = false;
  private disposed = false;

  constructor(private readonly recordGlob: () => string) {
    this.status.name = 'Knotwise: curve tables out of date';
    this.status.command = STALE_COMMAND;
  }

  /** Starts the scan and the watchers (once). */
  start(): void {
    if (this.started || this.disposed) return;
    this.started = true;
    const w = this.store.add(vscode.workspace.createFileSystemWatcher(this.recordGlob()));
    this.store.add(w.onDidCreate((u) => this.enqueue(u)));
    this.store.add(w.onDidChange((u) => this.enqueue(u)));
    this.store.add(w.onDidDelete((u) => this.forget(u)));
    void vscode.workspace.findFiles(this.recordGlob(), '**/{node_modules,.*}/**').then((found) => {
      for (const u of found) this.enqueue(u);
    });
  }

  /** Records out of date, in order of their URIs. */
  stale(): StaleRecord[] {
    return [...this.entries.entries()]
      .filter(([, e]) => e.reasons.length > 0 && e.files)
      .sort(([a], [b]) => a.localeCompare(b))
      .map(([k, e]) => ({ record: k, data: (e.files as RecordFiles).data.uri.toString(), reasons: [...e.reasons] }));
  }

  /** The status bar item's text (undefined while hidden). */
  get statusText(): string | undefined {
    return staleText(this.stale().length);
  }

  /** Resolves once every check queued so far is done (for the tests). */
  settled(): Promise<void> {
    return this.queue;
  }

  /** Checks a record after the ones queued before it. */
  private enqueue(recordUri: vscode.Uri): void {
    this.queue = this.queue.then(() => this.check(recordUri)).catch(() => undefined);
  }

  private forget(recordUri: vscode.Uri): void {
    const key = recordUri.toString();
    this.entries.delete(key);
    this.diagnostics.delete(recordUri);
    for (const set of this.namedBy.values()) set.delete(key);
    this.render();
  }

  /** A file's stamp now, or undefined when it is missing. */
  private async stampOf(uri: vscode.Uri): Promise<Stamp | undefined> {
    try {
      const st = await vscode.workspace.fs.stat(uri);
      const key = uri.toString();
      const known = this.stamps.get(key);
      if (known && known.size === st.size && known.mtime === st.mtime) return known;
      const fresh: Stamp = { size: st.size, mtime: st.mtime };
      this.stamps.set(key, fresh);
      return fresh;
    } catch (err) {
      if (isNotFound(err)) return undefined;
      throw err;
    }
  }

  /** The SHA-256 of a file with this stamp, read once per stamp. */
  private async hashOf(uri: vscode.Uri, stamp: Stamp): Promise<string> {
    stamp.sha256 ??= sha256(await vscode.workspace.fs.readFile(uri));
    return stamp.sha256;
  }

  /** Checks one record: its data and outputs against the SHA-256s it names. */
  private async check(recordUri: vscode.Uri): Promise<void> {
    if (this.disposed) return;
    const key = recordUri.toString();
    let bytes: Uint8Array;
    let recordStamp: Stamp | undefined;
    try {
      recordStamp = await this.stampOf(recordUri);
      if (!recordStamp) return this.forget(recordUri);
      bytes = await vscode.workspace.fs.readFile(recordUri);
    } catch {
      return;
    }
    const files = recordFiles(recordUri, bytes);
    if (!files) return this.forget(recordUri);
    const reasons: string[] = [];
    const first = !this.entries.has(key);
    const look = async (f: { uri: vscode.Uri; name: string; sha256: string }, what: string): Promise<void> => {
      this.watchFile(f.uri, key);
      const st = await this.stampOf(f.uri);
      if (!st) {
        reasons.push(`${what} ${f.name} is missing`);
        return;
      }
      // A first look hashes only files changed after the record was written (Knotwise writes the record last).
      if (first && st.sha256 === undefined && st.mtime <= recordStamp.mtime) return;
      if ((await this.hashOf(f.uri, st)) !== f.sha256) reasons.push(`${what} ${f.name} changed since the record was written (its SHA-256 differs)`);
    };
    await look(files.data, 'the data');
    for (const [i, o] of files.outputs.entries()) await look(o, i === 0 ? 'the curve table' : 'the output');
    this.entries.set(key, { files, reasons });
    if (reasons.length === 0) this.diagnostics.delete(recordUri);
    else {
      const text = new TextDecoder().decode(bytes);
      const at = Math.max(0, text.indexOf(`"${files.data.sha256}"`));
      const before = text.slice(0, at).split('\n');
      const line = before.length - 1;
      const col = (before[line] ?? '').length;
      const range = new vscode.Range(line, col, line, col + files.data.sha256.length + 2);
      const d = new vscode.Diagnostic(range, `Curve table out of date: ${reasons.join('; ')}. Refit and save to bring the table and this record up to date.`, vscode.DiagnosticSeverity.Warning);
      d.source = 'Knotwise';
      this.diagnostics.set(recordUri, [d]);
    }
    this.render();
  }

  /** Watches a file a record names, so a change to it checks the record again. */
  private watchFile(uri: vscode.Uri, recordKey: string): void {
    const key = uri.toString();
    let set = this.namedBy.get(key);
    if (!set) {
      set = new Set();
      this.namedBy.set(key, set);
    }
    set.add(recordKey);
    if (this.fileWatchers.has(key)) return;
    const slash = uri.path.lastIndexOf('/');
    const folder = uri.with({ path: uri.path.slice(0, Math.max(1, slash)) });
    const name = uri.path.slice(slash + 1).replace(/[[\]{}*?!]/g, (c) => `[${c}]`);
    const store = new DisposableStore();
    const w = store.add(vscode.workspace.createFileSystemWatcher(new vscode.RelativePattern(folder, name)));
    const again = (): void => {
      for (const r of this.namedBy.get(key) ?? []) this.enqueue(vscode.Uri.parse(r));
    };
    store.add(w.onDidChange(again));
    store.add(w.onDidCreate(again));
    store.add(w.onDidDelete(again));
    this.fileWatchers.set(key, store);
  }

  private render(): void {
    const stale = this.stale();
    const text = staleText(stale.length);
    if (!text) {
      this.status.hide();
      return;
    }
    this.status.text = text;
    this.status.tooltip = `${stale.map((s) => vscode.workspace.asRelativePath(vscode.Uri.parse(s.record))).join(', ')}: the data or a table changed since the fit record was written. Click for what to do.`;
    this.status.show();
  }

  /** The status bar item's command: pick a stale record, then refit and save, open the review, or show what changed. */
  async offer(): Promise<void> {
    const stale = this.stale();
    if (stale.length === 0) {
      void vscode.window.showInformationMessage('Knotwise: every curve table in the workspace matches its fit record.');
      return;
    }
    const pick =
      stale.length === 1
        ? stale[0]
        : (
            await vscode.window.showQuickPick(
              stale.map((s) => ({ label: vscode.workspace.asRelativePath(vscode.Uri.parse(s.record)), detail: s.reasons.join('; '), s })),
              { title: 'Knotwise: curve tables out of date', placeHolder: 'Choose a fit record' },
            )
          )?.s;
    if (!pick) return;
    const entry = this.entries.get(pick.record);
    const files = entry?.files;
    if (!files) return;
    const refit = 'Refit and save';
    const open = 'Open the review';
    const show = 'Show what changed';
    const action = await vscode.window.showQuickPick([refit, open, show], {
      title: `Knotwise: ${vscode.workspace.asRelativePath(vscode.Uri.parse(pick.record))}`,
      placeHolder: pick.reasons.join('; '),
    });
    if (action === refit) await vscode.commands.executeCommand('knotwise.saveCurveTable', files.data.uri, { columns: files.columns });
    else if (action === open) await vscode.commands.executeCommand('knotwise.tuneCurve', files.data.uri, { columns: files.columns });
    else if (action === show) {
      void vscode.window.showInformationMessage(`Knotwise: ${vscode.workspace.asRelativePath(vscode.Uri.parse(pick.record))} is out of date.`, {
        modal: true,
        detail: pick.reasons.map((r) => `• ${r}`).join('\n'),
      });
    }
  }

  dispose(): void {
    this.disposed = true;
    for (const w of this.fileWatchers.values()) w.dispose();
    this.fileWatchers.clear();
    this.store.dispose();
  }
}
