/**
 * Quick picks for the x, y and optional weight columns (for a binomial outcome: the
 * optional trials column instead of weights), then, when other columns remain, the
 * optional column to split the rows into groups by (extension/groupPick.ts): numeric
 * columns first, each with a preview of its first values; the last choice per file is
 * remembered in workspaceState and offered first next time.
 */
import * as vscode from 'vscode';
import type { ColumnInfo, ParsedTable } from '../core/ingest/types';
import { sig } from '../core/tune/format';

/** The columns chosen for one file (labels as in ParsedTable.columns). */
export interface ColumnChoice {
  readonly x: string;
  readonly y: string;
  /** Prior weights (any outcome; for a binomial outcome without trials, the trials of proportions). */
  readonly weights?: string | undefined;
  /**
   * Binomial outcome: the column with each row's number of trials (y then holds successes);
   * null when the person chose none, undefined when not asked yet.
   */
  readonly trials?: string | null | undefined;
  /**
   * The column whose cell texts name each row's group (the command line's --per): every
   * group is tuned and fitted on its own. null when the person chose no groups, undefined
   * when not asked yet.
   */
  readonly per?: string | null | undefined;
  /**
   * The second input of a surface (the command line's --x2): y is then fitted over x and x2
   * (extension/surfaceRun.ts). Undefined or null for a curve.
   */
  readonly x2?: string | null | undefined;
}

const MEMORY_KEY = 'knotwise.columns';
const PREVIEW_VALUES = 6;

/** Remembered choices per file URI. */
export class ColumnMemory {
  constructor(private readonly state: vscode.Memento) {}

  get(uri: vscode.Uri): ColumnChoice | undefined {
    const all = this.state.get<Record<string, ColumnChoice>>(MEMORY_KEY, {});
    return all[uri.toString()];
  }

  async set(uri: vscode.Uri, choice: ColumnChoice): Promise<void> {
    const all = { ...this.state.get<Record<string, ColumnChoice>>(MEMORY_KEY, {}) };
    all[uri.toString()] = choice;
    await this.state.update(MEMORY_KEY, all);
  }

  async forget(uri: vscode.Uri): Promise<void> {
    const all = { ...this.state.get<Record<string, ColumnChoice>>(MEMORY_KEY, {}) };
    delete all[uri.toString()];
    await this.state.update(MEMORY_KEY, all);
  }
}

/** True when every column of `choice` exists in `table`. */
export function choiceFits(table: ParsedTable, choice: ColumnChoice): boolean {
  const labels = new Set(table.columns.map((c) => c.label));
  const optional = (c: string | null | undefined): boolean => c === undefined || c === null || labels.has(c);
  return labels.has(choice.x) && labels.has(choice.y) && optional(choice.weights) && optional(choice.trials) && optional(choice.per) && optional(choice.x2);
}

/** The first few values of a column as text. */
export function preview(table: ParsedTable, column: ColumnInfo): string {
  const values = table.values[column.index];
  const out: string[] = [];
  for (let i = 0; values && i < values.length && out.length < PREVIEW_VALUES; i++) {
    const v = values[i] as number;
    out.push(Number.isNaN(v) ? '–' : sig(v, 5));
  }
  return out.join(', ') + (table.rowCount > PREVIEW_VALUES ? ', …' : '');
}

/** An entry of a column pick: a column, or the entry meaning none. */
export interface ColumnItem extends vscode.QuickPickItem {
  readonly label: string;
  readonly column?: ColumnInfo;
}

/** The first entry of the optional third pick. */
interface NoneItem {
  readonly label: string;
  readonly description: string;
}

const NO_WEIGHTS: NoneItem = { label: 'No weights', description: 'every row counts the same' };
const NO_TRIALS: NoneItem = { label: 'No trials column', description: 'y holds 0/1 outcomes or proportions' };

function items(table: ParsedTable, exclude: readonly string[], none: NoneItem | undefined): ColumnItem[] {
  const cols = table.columns.filter((c) => !exclude.includes(c.label));
  const numeric = cols.filter((c) => c.numeric);
  const other = cols.filter((c) => !c.numeric);
  const out: ColumnItem[] = [];
  if (none) out.push({ label: none.label, description: none.description });
  if (numeric.length) out.push({ label: 'Numeric columns', kind: vscode.QuickPickItemKind.Separator });
  for (const c of numeric) {
    out.push({
      label: c.label,
      description: c.unit ? `[${c.unit}]` : '',
      detail: `${preview(table, c)}${c.missingCount + c.invalidCount ? `  (${c.missingCount} missing, ${c.invalidCount} not numbers)` : ''}`,
      column: c,
    });
  }
  if (other.length) out.push({ label: 'Mostly text', kind: vscode.QuickPickItemKind.Separator });
  for (const c of other) out.push({ label: c.label, description: 'not numeric', detail: preview(table, c), column: c });
  return out;
}

/** One pick of the sequence (step `step` of `totalSteps`); undefined when dismissed. */
export async function pickOne(title: string, step: number, list: ColumnItem[], preferred: string | undefined, token: vscode.CancellationToken, totalSteps = 3): Promise<ColumnItem | undefined> {
  const qp = vscode.window.createQuickPick<ColumnItem>();
  qp.title = title;
  qp.step = step;
  qp.totalSteps = totalSteps;
  qp.placeholder = 'Type to filter the columns; Enter to choose';
  qp.matchOnDescription = true;
  qp.items = list;
  const active = list.find((i) => i.label === preferred && i.kind !== vscode.QuickPickItemKind.Separator) ?? list.find((i) => i.kind !== vscode.QuickPickItemKind.Separator);
  if (active) qp.activeItems = [active];
  return await new Promise<ColumnItem | undefined>((resolve) => {
    const done = (v: ColumnItem | undefined): void => {
      sub.dispose();
      resolve(v);
      qp.dispose();
    };
    const sub = vscode.Disposable.from(
      qp.onDidAccept(() => done(qp.selectedItems[0] ?? qp.activeItems[0])),
      qp.onDidHide(() => done(undefined)),
      token.onCancellationRequested(() => done(undefined)),
    );
    qp.show();
  });
}

/**
 * The optional last pick: which remaining column splits the rows into groups (`exclude`:
 * the columns already chosen); undefined when dismissed, null for no groups.
 */
export type GroupPick = (exclude: readonly string[], remembered: string | null | undefined, step: number, totalSteps: number) => Promise<string | null | undefined>;

/**
 * Asks for x, y and, as the third step, the weights, or for a binomial outcome
 * (`trials` true) the trials column; then, when `group` is given and columns remain, the
 * column to split the rows by. Undefined when the person dismissed a pick. The remembered
 * choice of a step not asked is kept.
 */
export async function pickColumns(
  table: ParsedTable,
  fileName: string,
  remembered: ColumnChoice | undefined,
  token: vscode.CancellationToken,
  trials = false,
  group?: GroupPick,
): Promise<ColumnChoice | undefined> {
  if (table.columns.length < 2) throw new Error(`${fileName} has ${table.columns.length} column; Knotwise needs at least two (x and y)`);
  const numeric = table.columns.filter((c) => c.numeric);
  // A fourth step only when a column may be left for it.
  const steps = group && !trials && table.columns.length > 2 ? 4 : 3;
  const pick = (title: string, step: number, list: ColumnItem[], preferred: string | undefined): Promise<ColumnItem | undefined> => pickOne(title, step, list, preferred, token, steps);
  const x = await pick(`Knotwise: the x column of ${fileName} (what was set or measured as input)`, 1, items(table, [], undefined), remembered?.x ?? numeric[0]?.label);
  if (!x?.column) return undefined;
  const y = await pick(
    `Knotwise: the y column of ${fileName} (the reading the curve describes)`,
    2,
    items(table, [x.label], undefined),
    remembered?.y ?? numeric.find((c) => c.label !== x.label)?.label,
  );
  if (!y?.column) return undefined;
  if (trials) {
    const t = await pick(`Knotwise: number of trials for ${fileName} (optional; y then counts the successes)`, 3, items(table, [x.label, y.label], NO_TRIALS), remembered?.trials ?? NO_TRIALS.label);
    if (!t) return undefined;
    return { x: x.label, y: y.label, weights: remembered?.weights, trials: t.column ? t.label : null, per: remembered?.per };
  }
  const w = await pick(`Knotwise: weights for ${fileName} (optional)`, 3, items(table, [x.label, y.label], NO_WEIGHTS), remembered?.weights ?? NO_WEIGHTS.label);
  if (!w) return undefined;
  const weights = w.column ? w.label : undefined;
  const chosen = [x.label, y.label, ...(weights !== undefined ? [weights] : [])];
  let per = remembered?.per;
  if (group && table.columns.some((c) => !chosen.includes(c.label))) {
    per = await group(chosen, remembered?.per, 4, steps);
    if (per === undefined) return undefined;
  } else if (group) per = null;
  return { x: x.label, y: y.label, weights, trials: remembered?.trials, per };
}

/** Asks only for the trials column of a binomial outcome (x and y already chosen); undefined when dismissed. */
export async function pickTrials(table: ParsedTable, fileName: string, choice: ColumnChoice, token: vscode.CancellationToken): Promise<ColumnChoice | undefined> {
  const t = await pickOne(
    `Knotwise: number of trials for ${fileName} (optional; y then counts the successes)`,
    3,
    items(table, [choice.x, choice.y], NO_TRIALS),
    choice.trials ?? NO_TRIALS.label,
    token,
  );
  if (!t) return undefined;
  return { ...choice, trials: t.column ? t.label : null };
}
