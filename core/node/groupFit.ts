/**
 * `knotwise fit --per <column>` and `--channels <list>`: the grouped fit of one file, its
 * outputs written as one set (tables, summary, group record), and its summary or JSON.
 */
import { basename, dirname } from 'node:path';
import { InputError } from '../errors';
import type { GroupSpec } from '../groups/spec';
import type { FitPlan } from '../outputs/plan';
import type { OutputFile } from '../outputs/deliver';
import { CAUTION } from '../words/caution';
import { sig } from '../words/numbers';
import { VERSION } from '../version';
import { runGroupPipeline } from './groupPipeline';
import { writeOutputs } from './outputs';
import { checkOutputFolder, checkOutputNames, terminalText } from './outputTargets';
import { type Clock, ProgressLine, type ProgressStream } from './progress';

/** Where the grouped fit reads and writes, and how it prints. */
export interface GroupFitIo {
  readonly file: string;
  /** Folder to write into; undefined: write nothing (--print-only). */
  readonly out?: string | undefined;
  readonly force: boolean;
  readonly json: boolean;
  readonly quiet: boolean;
}

/** Runs a grouped fit; returns the exit code (0). Throws InputError for bad input. */
export async function runGroupFit(plan: FitPlan & { readonly groups: GroupSpec }, io: GroupFitIo, env: { readonly progressStream: ProgressStream; readonly clock: Clock }): Promise<number> {
  if (io.out !== undefined) checkOutputFolder(io.out);
  const progress = env.progressStream.isTTY === true && !io.quiet ? new ProgressLine(env.progressStream, env.clock) : undefined;
  let run;
  try {
    run = await runGroupPipeline(io.file, plan, io.out ?? dirname(io.file), progress);
  } catch (err) {
    if (err instanceof InputError && err.place.file === undefined) throw new InputError(err.raw, { ...err.place, file: io.file });
    throw err;
  } finally {
    progress?.finish();
  }
  const d = run.deliverables;
  let written: string[] | undefined;
  if (io.out !== undefined) {
    const files: OutputFile[] = d.files.map((f) => ({ kind: f.kind === 'record' ? 'record' : 'table', name: f.name, text: f.text }));
    const record = files[files.length - 1] as OutputFile;
    if (!io.force)
      checkOutputNames(
        io.out,
        files.map((f) => f.name),
        record.name,
        io.file,
      );
    written = writeOutputs(io.out, files, io.file, io.force);
  }
  if (io.json) {
    process.stdout.write(
      JSON.stringify({ knotwise: VERSION, data: { file: basename(io.file), sha256: run.table.sha256, rowsRead: run.table.rowCount }, ...d.record, written: written ?? null }) + '\n',
    );
  } else if (!io.quiet) {
    const rec = d.record as { shared: { df: number; reason: string } | null; common: { words: string } | null };
    const rejected = run.split.rejected.length;
    const lines = [`${basename(io.file)}: ${run.analysis.groups.length} groups, ${rejected} row${rejected === 1 ? '' : 's'} rejected`];
    for (const r of run.split.rejected.slice(0, 10)) lines.push(`  line ${r.line}${r.column ? ` (${r.column})` : ''}: ${r.reason}`);
    if (run.split.rejected.length > 10) lines.push(`  ... and ${run.split.rejected.length - 10} more`);
    if (rec.shared) lines.push(rec.shared.reason);
    for (const g of run.analysis.groups) {
      const a = g.analysis;
      const h = a.tune.holdout;
      lines.push(`  ${g.name}: ${a.n} rows, df ${sig(a.chosen.df, 4)}, residual SD ${sig(a.chosen.sigma, 4)}${h ? `, held-out RMSE ${sig(h.rmse, 4)} (${h.rows} rows)` : ''}`);
    }
    if (rec.common) lines.push(`One curve for all? ${rec.common.words}`);
    if (written) for (const f of written) lines.push(`Wrote ${f}`);
    lines.push(`Caution: ${CAUTION}`);
    process.stdout.write(terminalText(lines.join('\n')) + '\n');
  }
  return 0;
}
