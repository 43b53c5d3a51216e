/**
 * Rejected rows as entries in the Problems panel: one per row, at its line and (when the
 * problem is one cell) that cell's columns, with the reason. Replaced on every run,
 * cleared when the file is closed or no longer has rejected rows.
 */
import * as vscode from 'vscode';
import type { RejectedRow } from '../core/ingest/select';
import type { ParsedTable } from '../core/ingest/types';

/** Character range [start, end) of field `index` in one CSV line (quotes respected). */
export function fieldRange(line: string, delimiter: string, index: number): [number, number] | undefined {
  let field = 0;
  let start = 0;
  let quoted = false;
  for (let i = 0; i <= line.length; i++) {
    const c = line[i];
    if (c === '"') quoted = !quoted;
    if (i === line.length || (!quoted && c === delimiter)) {
      if (field === index) return [start, i];
      field++;
      start = i + 1;
    }
  }
  return undefined;
}

/** The Problems entries Knotwise owns. */
export class RejectedRowsView implements vscode.Disposable {
  private readonly collection = vscode.languages.createDiagnosticCollection('knotwise');

  /** Replaces the entries of `uri` with one per rejected row. */
  show(uri: vscode.Uri, text: string, table: ParsedTable, rejected: readonly RejectedRow[]): void {
    if (rejected.length === 0) {
      this.collection.delete(uri);
      return;
    }
    const lines = text.split(/\r\n|\r|\n/);
    const seen = new Set<number>();
    const entries: vscode.Diagnostic[] = [];
    for (const r of rejected) {
      if (seen.has(r.line)) continue;
      seen.add(r.line);
      const lineText = lines[r.line - 1] ?? '';
      const col = r.column ? table.columns.find((c) => c.label === r.column) : undefined;
      const span = col ? fieldRange(lineText, table.format.delimiter, col.index) : undefined;
      const range = new vscode.Range(r.line - 1, span ? span[0] : 0, r.line - 1, span ? span[1] : lineText.length);
      const where = r.column ? `column "${r.column}": ` : '';
      const d = new vscode.Diagnostic(range, `Row not used by Knotwise: ${where}${r.reason}`, vscode.DiagnosticSeverity.Warning);
      d.source = 'Knotwise';
      entries.push(d);
    }
    this.collection.set(uri, entries);
  }

  /** True when `uri` has entries. */
  has(uri: vscode.Uri): boolean {
    return (this.collection.get(uri)?.length ?? 0) > 0;
  }

  clear(uri: vscode.Uri): void {
    this.collection.delete(uri);
  }

  dispose(): void {
    this.collection.dispose();
  }
}
