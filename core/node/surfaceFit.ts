/**
 * `knotwise fit --x <u> --x2 <v> --y <y>`: the surface fit of one file, its outputs written
 * as one set (table, code, report, surface record), and its summary or JSON.
 */
import { basename, dirname } from 'node:path';
import { InputError } from '../errors';
import type { OutputFile } from '../outputs/deliver';
import { formatResampling } from '../registry/resampling/index';
import { gridText } from '../surface/deliver';
import { landscapeLines } from '../surface/words';
import { VERSION } from '../version';
import { SURFACE_CAUTION } from '../words/caution';
import { sig } from '../words/numbers';
import { writeOutputs } from './outputs';
import { checkOutputFolder, checkOutputNames, terminalText } from './outputTargets';
import { type Clock, ProgressLine, type ProgressStream } from './progress';
import type { SurfaceFitArgs } from './surfaceArgs';
import { runSurfacePipeline } from './surfacePipeline';

/** Runs a surface fit; returns the exit code (0). Throws InputError for bad input. */
export async function runSurfaceFit(args: SurfaceFitArgs, env: { readonly progressStream: ProgressStream; readonly clock: Clock }): Promise<number> {
  if (args.out !== undefined) checkOutputFolder(args.out);
  const show = args.progress || (env.progressStream.isTTY === true && !args.quiet);
  const progress = show ? new ProgressLine(env.progressStream, env.clock) : undefined;
  let run;
  try {
    run = await runSurfacePipeline(args.file, args.plan, args.out ?? dirname(args.file), progress);
  } catch (err) {
    if (err instanceof InputError && err.place.file === undefined) throw new InputError(err.raw, { ...err.place, file: args.file });
    throw err;
  } finally {
    progress?.finish();
  }
  const d = run.deliverables;
  let written: string[] | undefined;
  if (args.out !== undefined) {
    // The surface's files go through the same commit path as a curve's: every file of the set, the record last.
    const files: OutputFile[] = d.files.map((f) => ({ kind: f.kind === 'record' ? 'record' : 'table', name: f.name, text: f.text }));
    const record = files[files.length - 1] as OutputFile;
    if (!args.force)
      checkOutputNames(
        args.out,
        files.map((f) => f.name),
        record.name,
        args.file,
      );
    written = writeOutputs(args.out, files, args.file, args.force);
  }
  if (args.json) {
    const rows = d.table.rows.map((r) => r.map((v) => (Number.isFinite(v) ? v : null)));
    process.stdout.write(JSON.stringify({ knotwise: VERSION, ...d.record, tableColumns: d.table.columns, tableRows: rows, written: written ?? null }) + '\n');
    return 0;
  }
  if (args.quiet) return 0;
  const sel = run.selection;
  const f = run.fit;
  const names = { u: sel.labels.u, v: sel.labels.v };
  const lines = [`${basename(args.file)}: ${f.n} rows used, ${sel.rejected.length} rejected`];
  for (const r of sel.rejected.slice(0, 10)) lines.push(`  line ${r.line}${r.column ? ` (${r.column})` : ''}: ${r.reason}`);
  if (sel.rejected.length > 10) lines.push(`  ... and ${sel.rejected.length - 10} more`);
  if (run.tune) {
    lines.push(`Tuning (${formatResampling(run.tune.resample)}, seed ${run.tune.seed}):`, ...landscapeLines(run.tune, names).map((l) => `  ${l}`));
    for (const c of run.tune.candidates) if (c.skipped !== undefined) lines.push(`  df ${c.dfU} × ${c.dfV}: skipped - ${c.skipped}`);
    lines.push(run.tune.selected.reason);
    for (const n of run.tune.notes) lines.push(`Note: ${n}`);
  }
  lines.push(`Fit: surface df ${f.dfU} × ${f.dfV} = ${f.df}, residual SD ${sig(f.sigma, 4)}, R² ${sig(f.r2, 4)}, LOO RMSE ${sig(f.looRmse, 4)}, GCV ${sig(f.gcv, 4)}`);
  for (const n of f.notes) lines.push(`Note: ${n}`);
  lines.push(`Table: ${d.grid.us.length} x ${d.grid.vs.length} nodes (${gridText(d.grid, names)}); ${d.table.outside} outside the readings' hull, ${d.table.far} beyond their reach`);
  for (const w of d.warnings) lines.push(`Warning: ${w}`);
  if (written) for (const p of written) lines.push(`Wrote ${p}`);
  lines.push(`Caution: ${SURFACE_CAUTION}`);
  process.stdout.write(terminalText(lines.join('\n')) + '\n');
  return 0;
}
