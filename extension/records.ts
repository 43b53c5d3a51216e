/**
 * Every fit record in the workspace, watched: a record is out of date when its data file
 * or one of its outputs (the curve table and any other file it lists) is no longer the
 * bytes whose SHA-256 it names. The check is cheap (core/outputs/recordScan.ts, here on
 * workspace.fs): a file's size and modification time first, and its bytes are hashed only
 * when those are new; the first look at a record hashes only files newer than the record
 * itself (Knotwise writes the record last). Records out of date get a Problems entry on the
 * record file and count in a status bar item, whose command offers to refit and save, open
 * the review, or show what changed (the full check of extension/checkTables.ts). The scan
 * starts after activation, off the activation path; watchers follow the records and the
 * files they name.
 */
import * as vscode from 'vscode';
import { RecordScan, type RecordFiles, type RecordRead, type ScanFileSystem } from '../core/outputs/recordScan';
import { fullCheck, needsDisk, showCheck } from './checkTables';
import { isNotFound, sha256 } from './csvSource';
import { DisposableStore } from './disposables';

/** The command of the status bar item (also in package.json). */
export const STALE_COMMAND = 'knotwise.showStaleTables';

/** A sentence's text with its first letter in capitals. */
const capitalised = (text: string): string => text.charAt(0).toUpperCase() + text.slice(1);

/** Folders the search for records leaves out. */
const RECORD_SEARCH_EXCLUDE = '**/{node_modules,.*}/**';

/** What the watch knows of one record. */
interface Entry {
  files: RecordFiles | undefined;
  /** Why the record is out of date (empty: current). */
  reasons: readonly string[];
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

/**
 * The workspace file system as the record scan sees it: paths are URIs as text, and a name
 * from a record is placed relative to the record's folder (or, starting with '/', as a path
 * in the record's scheme and authority).
 */
const workspaceScanFs: ScanFileSystem = {
  stat: async (path) => {
    try {
      const st = await vscode.workspace.fs.stat(vscode.Uri.parse(path));
      return { size: st.size, mtime: st.mtime };
    } catch (err) {
      if (isNotFound(err)) return undefined;
      throw err;
    }
  },
  readFile: async (path) => vscode.workspace.fs.readFile(vscode.Uri.parse(path)),
  resolve: (record, name) => {
    const folder = vscode.Uri.joinPath(vscode.Uri.parse(record), '..');
    return (name.startsWith('/') ? folder.with({ path: name }) : vscode.Uri.joinPath(folder, name)).toString();
  },
};

/** Watches the workspace's fit records. */
export class RecordWatch implements vscode.Disposable {
  private readonly store = new DisposableStore();
  private readonly diagnostics = this.store.add(vscode.languages.createDiagnosticCollection('knotwise-records'));
  private readonly status = this.store.add(vscode.window.createStatusBarItem('knotwise.staleTables', vscode.StatusBarAlignment.Left, 50));
  private readonly entries = new Map<string, Entry>();
  private readonly scan = new RecordScan(workspaceScanFs, sha256);
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
    void this.findRecords().then((found) => {
      for (const u of found) this.enqueue(u);
    });
  }

  /** Every fit record in the workspace (the glob of the watch), in order of their URIs. */
  async findRecords(): Promise<vscode.Uri[]> {
    const found = await vscode.workspace.findFiles(this.recordGlob(), RECORD_SEARCH_EXCLUDE);
    return found.sort((a, b) => a.toString().localeCompare(b.toString()));
  }

  /** Checks these records again (starting the watch if need be); resolves when every check queued so far is done. */
  refresh(records: readonly vscode.Uri[]): Promise<void> {
    this.start();
    for (const u of records) this.enqueue(u);
    return this.settled();
  }

  /** Records out of date, in order of their URIs. */
  stale(): StaleRecord[] {
    return [...this.entries.entries()]
      .filter(([, e]) => e.reasons.length > 0 && e.files)
      .sort(([a], [b]) => a.localeCompare(b))
      .map(([k, e]) => ({ record: k, data: (e.files as RecordFiles).data.path, reasons: [...e.reasons] }));
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
    this.scan.forget(key);
    this.diagnostics.delete(recordUri);
    for (const set of this.namedBy.values()) set.delete(key);
    this.render();
  }

  /** Checks one record: its data and outputs against the SHA-256s it names. */
  private async check(recordUri: vscode.Uri): Promise<void> {
    if (this.disposed) return;
    const key = recordUri.toString();
    let read: RecordRead;
    try {
      read = await this.scan.read(key);
    } catch {
      return;
    }
    if (read.state !== 'record') return this.forget(recordUri);
    const { files, bytes } = read;
    for (const f of [files.data, ...files.outputs]) this.watchFile(vscode.Uri.parse(f.path), key);
    const reasons = await this.scan.compare(read);
    this.entries.set(key, { files, reasons });
    if (reasons.length === 0) this.diagnostics.delete(recordUri);
    else {
      const text = new TextDecoder().decode(bytes);
      const at = Math.max(0, text.indexOf(`"${files.data.sha256}"`));
      const before = text.slice(0, at).split('\n');
      const line = before.length - 1;
      const col = (before[line] ?? '').length;
      const range = new vscode.Range(line, col, line, col + files.data.sha256.length + 2);
      const advice =
        files.kind === 'group'
          ? `Group tables out of date: ${reasons.join('; ')}. Open the review and save every group to bring the tables and this group record up to date.`
          : files.kind === 'surface'
            ? `Surface table out of date: ${reasons.join('; ')}. Run the record's regenerate command to bring the table and this surface record up to date.`
            : `Curve table out of date: ${reasons.join('; ')}. Refit and save to bring the table and this record up to date.`;
      const d = new vscode.Diagnostic(range, advice, vscode.DiagnosticSeverity.Warning);
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

  /** The status bar item's command: pick a stale record, then refit and save, open the review, or show what changed (a group record: open its grouped review, or show what changed). */
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
    // A group record is brought up to date from its review (Save every group); one made from
    // several reading columns has no editor flow, so only what changed is shown for it.
    // A surface record is brought up to date by its regenerate command (the command line).
    const actions = files.kind === 'group' ? (files.columns.per !== undefined ? [open, show] : [show]) : files.kind === 'surface' ? [show] : [refit, open, show];
    const action = await vscode.window.showQuickPick(actions, {
      title: `Knotwise: ${vscode.workspace.asRelativePath(vscode.Uri.parse(pick.record))}`,
      placeHolder: pick.reasons.join('; '),
    });
    const data = vscode.Uri.parse(files.data.path);
    if (action === refit) await vscode.commands.executeCommand('knotwise.saveCurveTable', data, { columns: files.columns });
    else if (action === open) await vscode.commands.executeCommand('knotwise.tuneCurve', data, { columns: files.columns });
    else if (action === show) await this.showWhatChanged(vscode.Uri.parse(pick.record), pick.reasons);
  }

  /**
   * What changed in one record: on disk the full check (every output rebuilt from the data
   * and the recorded spec, compared byte for byte) with a progress notification, then its
   * messages; elsewhere the cheap reasons, saying why that is all.
   */
  private async showWhatChanged(recordUri: vscode.Uri, reasons: readonly string[]): Promise<void> {
    const shown = vscode.workspace.asRelativePath(recordUri);
    if (recordUri.scheme !== 'file') {
      void vscode.window.showInformationMessage(`Knotwise: ${shown} is out of date.`, {
        modal: true,
        detail: [...reasons.map((r) => `• ${r}`), '', `${capitalised(needsDisk(recordUri))}.`].join('\n'),
      });
      return;
    }
    const result = await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: `Knotwise: checking ${shown} (rebuilding every output from the data)` }, () =>
      fullCheck(recordUri),
    );
    await this.refresh([recordUri]);
    void showCheck(result);
  }

  dispose(): void {
    this.disposed = true;
    for (const w of this.fileWatchers.values()) w.dispose();
    this.fileWatchers.clear();
    this.store.dispose();
  }
}
