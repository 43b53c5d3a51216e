/**
 * One analysis run off the extension host's main thread: core's analysis with the shared
 * worker pool, progress in a cancellable notification and in the panel, and cancellation
 * from either the notification or the run's own token (a newer run, Stop Tuning).
 */
import * as vscode from 'vscode';
import { analyse } from '../core/analysis/analysis';
import type { Analysis, AnalysisOptions } from '../core/analysis/types';
import { analyseGroups, type GroupAnalysis } from '../core/groups/analyse';
import type { Group } from '../core/groups/split';
import type { ResampleRunner } from '../core/tune/tune';
import type { Progress } from '../core/tune/types';
import type { XYData } from '../core/types';

/** Smallest interval between progress updates (ms), so the notification is not flooded. */
const PROGRESS_INTERVAL_MS = 150;

/** A run that has started: its id and how to stop it. */
export class RunTicket implements vscode.Disposable {
  private readonly source = new vscode.CancellationTokenSource();
  /** SHA-256 of the bytes the run read, once it has read them. */
  sha256: string | undefined;

  constructor(readonly runId: number) {}

  get token(): vscode.CancellationToken {
    return this.source.token;
  }

  get cancelled(): boolean {
    return this.source.token.isCancellationRequested;
  }

  cancel(): void {
    this.source.cancel();
  }

  dispose(): void {
    this.source.dispose();
  }
}

/** Where a run's progress goes besides the notification: the step in words and the fraction done (0 to 1). */
export type ProgressListener = (message: string, fraction: number) => void;

/**
 * Analyses `data` with a cancellable progress notification; `onProgress` hears the same
 * steps (at most one per PROGRESS_INTERVAL_MS). The chosen fit's residual checks run when
 * first read (the panel shows the curve first). Rejects with CancelledError when the
 * notification's Cancel button or `token` stops it.
 */
export function analyseWithProgress(runner: ResampleRunner, file: string, data: XYData, options: AnalysisOptions, token: vscode.CancellationToken, onProgress: ProgressListener): Promise<Analysis> {
  return withRunProgress(`Knotwise: tuning the curve for ${file}`, token, onProgress, (progress) => analyse(data, options, runner, progress, 'when-read'));
}

/**
 * Tunes every group as analyseWithProgress tunes one data set (core/groups/analyse.ts: one
 * group after another, or one df shared by all when `shared`), with the same notification
 * and panel progress. Rejects with CancelledError when stopped.
 */
export function analyseGroupsWithProgress(
  runner: ResampleRunner,
  file: string,
  groups: readonly Group[],
  options: AnalysisOptions,
  shared: boolean,
  token: vscode.CancellationToken,
  onProgress: ProgressListener,
): Promise<GroupAnalysis> {
  return withRunProgress(`Knotwise: tuning a curve for each of the ${groups.length} groups of ${file}`, token, onProgress, (progress) => analyseGroups(groups, options, shared, runner, progress));
}

/** Runs `work` with a cancellable progress notification that `onProgress` hears too (at most one step per PROGRESS_INTERVAL_MS). */
export function withRunProgress<T>(title: string, token: vscode.CancellationToken, onProgress: ProgressListener, work: (progress: Progress) => Promise<T>): Promise<T> {
  return Promise.resolve(
    vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title, cancellable: true }, async (progress, notificationToken) => {
      let last = 0;
      let shown = 0;
      return work({
        report: (done, total, message) => {
          const now = Date.now();
          if (now - last < PROGRESS_INTERVAL_MS && done < total) return;
          last = now;
          const pct = total > 0 ? Math.min(100, (100 * done) / total) : 0;
          progress.report({ message: `${message} (${Math.round(pct)} %)`, increment: Math.max(0, pct - shown) });
          shown = pct;
          onProgress(message, pct / 100);
        },
        cancelled: () => notificationToken.isCancellationRequested || token.isCancellationRequested,
      });
    }),
  );
}
