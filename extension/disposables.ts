import type * as vscode from 'vscode';

/** Collects everything the host registers and disposes it in reverse order, once. */
export class DisposableStore implements vscode.Disposable {
  private items: vscode.Disposable[] = [];
  private disposed = false;

  /** Adds a disposable (disposed at once when the store already is) and returns it. */
  add<T extends vscode.Disposable>(item: T): T {
    if (this.disposed) item.dispose();
    else this.items.push(item);
    return item;
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    for (const item of this.items.reverse()) {
      try {
        item.dispose();
      } catch (err) {
        console.error('Knotwise: dispose failed', err);
      }
    }
    this.items = [];
  }
}
