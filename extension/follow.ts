/**
 * Following one data file: a file-system watcher for changes on disk (another program,
 * a save, a delete), and the editor's events handed in by the controller (an edit, a
 * save, a closed document). Every touch restarts a short timer; when it runs out the
 * session compares the data now with the bytes it analysed, once for the whole burst.
 */
import * as vscode from 'vscode';
import { DisposableStore } from './disposables';

/** What happened to the data file. */
export type Touch = 'edit' | 'save' | 'disk' | 'close';

/** Quiet time after the last touch before the data is compared (ms): short enough for a banner within a second. */
export const FOLLOW_DELAY_MS = 150;

/** Watches one data file while its panel is open, and gathers touches into one comparison. */
export class DataFollower implements vscode.Disposable {
  private watching: DisposableStore | undefined;
  private timer: ReturnType<typeof setTimeout> | undefined;
  private touches = new Set<Touch>();

  constructor(
    private readonly uri: vscode.Uri,
    private readonly settled: (touches: ReadonlySet<Touch>) => void,
  ) {}

  /** Starts watching the file on disk (once). */
  start(): void {
    if (this.watching) return;
    const slash = this.uri.path.lastIndexOf('/');
    const folder = this.uri.with({ path: this.uri.path.slice(0, Math.max(1, slash)) });
    const name = this.uri.path.slice(slash + 1);
    // The file's own name as the pattern, with glob characters bracketed so they match themselves.
    const pattern = name.replace(/[[\]{}*?!]/g, (c) => `[${c}]`);
    const store = new DisposableStore();
    const w = store.add(vscode.workspace.createFileSystemWatcher(new vscode.RelativePattern(folder, pattern)));
    const onDisk = (u: vscode.Uri): void => {
      if (u.toString() === this.uri.toString()) this.touch('disk');
    };
    store.add(w.onDidChange(onDisk));
    store.add(w.onDidCreate(onDisk));
    store.add(w.onDidDelete(onDisk));
    this.watching = store;
  }

  /** True while touches wait for their comparison. */
  get pending(): boolean {
    return this.touches.size > 0;
  }

  /** Notes a touch and restarts the quiet-time timer. */
  touch(t: Touch): void {
    this.touches.add(t);
    if (this.timer !== undefined) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.settled(this.take()), FOLLOW_DELAY_MS);
  }

  /** The touches gathered so far (the timer is stopped: the caller compares now). */
  take(): ReadonlySet<Touch> {
    if (this.timer !== undefined) clearTimeout(this.timer);
    this.timer = undefined;
    const t = this.touches;
    this.touches = new Set();
    return t;
  }

  /** Stops watching and forgets pending touches. */
  stop(): void {
    this.take();
    this.watching?.dispose();
    this.watching = undefined;
  }

  dispose(): void {
    this.stop();
  }
}
