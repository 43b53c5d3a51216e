/**
 * What the extension offers the commands' callers (keybindings, other extensions, the
 * tests): the options of the commands, what a run resolves to, and the value `activate`
 * returns.
 */
import type * as vscode from 'vscode';
import type { RuleSpec } from '../core/tune/types';
import type { Outcome, Shape } from '../core/types';
import type { HostMessage } from '../core/protocol';
import type { DataStateView, PanelPayload } from '../core/view/model';
import type { GroupsView } from '../core/view/groups';
import type { SurfaceView } from '../core/view/surface';
import type { ColumnChoice } from './columns';
import type { OverwriteAnswer } from './save';

/** Options of the tune command (for keybindings, other extensions and tests). */
export interface TuneCommandOptions {
  /** Columns to use without asking (`trials`: a binomial outcome's trials column; `per`: the column that splits the rows into groups, each tuned on its own; `x2`: a second input, for a surface). */
  readonly columns?: ColumnChoice;
}

/** Options of the save command. */
export interface SaveCommandOptions extends TuneCommandOptions {
  /** Answer to "replace a file Knotwise did not write?" without asking (default: ask). */
  readonly replaceForeignFiles?: OverwriteAnswer;
  /** Rule to save with (default: the panel's current choice, else the settings' rule). */
  readonly rule?: RuleSpec;
  /** Answer to "save the data file's unsaved edits first?" without asking (default: ask; no: nothing is saved). */
  readonly saveEditedData?: OverwriteAnswer;
}

/** The outcome family, shapes and robust fitting of a run's chosen fit, with its model report's numbers. */
export interface ModelSummary {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant when robust. */
  readonly robustK?: number;
  /** Binomial: the trials column used. */
  readonly trials?: string;
  readonly converged: boolean;
  readonly iterations: number;
  readonly deviance?: number;
  readonly dispersion?: number;
  /** Robust scale. */
  readonly scale?: number;
  /** Down-weighted rows by CSV line (at most the listed ones). */
  readonly downweightedLines?: readonly number[];
  readonly activeConstraints?: number;
}

/** What a run command resolves to. */
export interface RunSummary {
  readonly status: 'done' | 'cancelled' | 'failed' | 'superseded' | 'dismissed';
  readonly file: string;
  readonly runId?: number;
  readonly chosenDf?: number;
  readonly candidates?: readonly number[];
  readonly rowsUsed?: number;
  readonly rejected?: number;
  readonly model?: ModelSummary;
  readonly message?: string;
  /** A grouped run: every group in the file's order, with its chosen df and rows (chosenDf and candidates above are the group shown). */
  readonly groups?: readonly { readonly name: string; readonly chosenDf: number; readonly rowsUsed: number }[];
  /** A grouped run with one df for all groups: that df. */
  readonly sharedDf?: number;
  /** A surface run (columns.x2 given): the df pair shown, of the first input and of the second. */
  readonly surface?: { readonly x: number; readonly x2: number };
}

/** What a save command resolves to: the run's summary and the files written (URIs as text). */
export type SaveSummary = RunSummary & { readonly files?: readonly string[] };

/** What the extension offers other extensions and its tests (the value `activate` returns). */
export interface KnotwiseApi {
  /**
   * The panel of a file: its latest payload, how many results were posted to it, how many
   * analyses ran, and whether its script has loaded; for a grouped run also the overview and
   * the index of the group the payload shows.
   */
  panelState(uri: vscode.Uri):
    | {
        readonly payload: PanelPayload;
        readonly posted: number;
        readonly analysed: number;
        readonly ready: boolean;
        readonly groups?: { readonly view: GroupsView; readonly index: number };
      }
    | undefined;
  /** The surface a file's panel shows (two inputs), and how many analyses ran; undefined while it shows none. */
  surfaceState(uri: vscode.Uri): { readonly view: SurfaceView; readonly analysed: number } | undefined;
  /** Whether the analysis a file's panel shows is of the data as it is now (as the panel is told). */
  dataState(uri: vscode.Uri): DataStateView | undefined;
  /** The latest messages posted to a file's open panel, oldest first (empty without one). */
  panelLog(uri: vscode.Uri): readonly HostMessage[];
  /**
   * Hands `message` to a file's open panel's host side as if the panel had sent it (checked
   * by the same guard); false when there is no open panel or the guard refuses it.
   */
  panelMessage(uri: vscode.Uri, message: unknown): boolean;
  /**
   * The workspace's fit records out of date (their data or an output is no longer the bytes
   * they name) and the status bar item's text, once the checks queued so far are done.
   */
  staleRecords(): Promise<{ readonly statusText: string | undefined; readonly records: readonly StaleRecordView[] }>;
}

/** A fit record out of date: its URI and its data file's (as text) and why. */
export interface StaleRecordView {
  readonly record: string;
  readonly data: string;
  readonly reasons: readonly string[];
}
