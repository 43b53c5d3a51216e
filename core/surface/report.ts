/**
 * The review report of a surface fit: a Markdown page with the choice of the df pair in
 * words, the error landscape, the fit, the table's coverage with the heat figure, the data's
 * provenance, how to reproduce it, and the caution.
 */
import type { RejectedRow } from '../ingest/select';
import { formatResampling } from '../registry/resampling/index';
import { sig } from '../words/numbers';
import type { SurfaceFit } from './fit';
import type { SurfaceTuneResult } from './tune';
import { landscapeLines } from './words';

/** Rejected rows listed before "... and N more". */
const LIST_LIMIT = 20;

/** What the surface report says. */
export interface SurfaceReportInput {
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly labels: { readonly u: string; readonly v: string; readonly y: string; readonly weights?: string | undefined };
  readonly rowsRead: number;
  readonly rejected: readonly RejectedRow[];
  readonly fit: SurfaceFit;
  readonly tune?: SurfaceTuneResult | undefined;
  readonly table: { readonly file: string; readonly nodesU: number; readonly nodesV: number; readonly outside: number; readonly far: number; readonly reach: number; readonly gridWords: string };
  readonly figure: { readonly file: string; readonly alt: string };
  readonly warnings: readonly string[];
  readonly recordFile: string;
  readonly regenerate: string;
  readonly emitted: readonly string[];
  readonly caution: string;
}

/** Markdown text with characters that would start markup escaped (names come from the CSV). */
function md(text: string): string {
  return text.replace(/([\\`*_[\]<>|#])/g, '\\$1');
}

/**
 * The report's Markdown (LF, final newline). Deterministic: no dates. O(candidates + listed rows).
 * Example: surfaceReport(input).startsWith('# Surface review: ').
 */
export function surfaceReport(input: SurfaceReportInput): string {
  const f = input.fit;
  const t = input.tune;
  const L = input.labels;
  const out: string[] = [`# Surface review: ${md(L.y)} over ${md(L.u)} and ${md(L.v)}`, '', `Data: \`${md(input.dataFile)}\` (SHA-256 \`${input.dataSha256}\`)`, ''];
  out.push(`${f.n} rows used of ${input.rowsRead} read; ${input.rejected.length} rejected.`);
  for (const r of input.rejected.slice(0, LIST_LIMIT)) out.push(`- line ${r.line}${r.column ? ` (${md(r.column)})` : ''}: ${md(r.reason)}`);
  if (input.rejected.length > LIST_LIMIT) out.push(`- ... and ${input.rejected.length - LIST_LIMIT} more`);
  out.push('', '## The choice', '');
  if (t) {
    out.push(`Resampling ${formatResampling(t.resample)}, seed ${t.seed}.`, '', md(t.selected.reason), '', '### Error landscape', '', '```', ...landscapeLines(t, { u: L.u, v: L.v }), '```', '');
    for (const n of t.notes) out.push(`- ${md(n)}`);
    if (t.notes.length) out.push('');
    const skipped = t.candidates.filter((c) => c.skipped !== undefined);
    if (skipped.length) {
      out.push('Skipped pairs:', '');
      for (const c of skipped) out.push(`- df ${c.dfU} × ${c.dfV}: ${md(c.skipped as string)}`);
      out.push('');
    }
  } else out.push(`df ${f.dfU} × ${f.dfV} was fitted as given (no tuning).`, '');
  out.push(
    '## The fit',
    '',
    `Tensor-product natural cubic regression spline, df ${f.dfU} (${md(L.u)}) × ${f.dfV} (${md(L.v)}) = ${f.df}; residual SD ${sig(f.sigma, 4)}, R² ${sig(f.r2, 4)}, leave-one-out RMSE ${sig(f.looRmse, 4)}, GCV ${sig(f.gcv, 4)}.`,
    '',
  );
  for (const n of f.notes) out.push(`- ${md(n)}`);
  if (f.notes.length) out.push('');
  const tb = input.table;
  const flagged = tb.outside + tb.far;
  out.push(
    '## The table',
    '',
    `\`${md(tb.file)}\`: ${tb.nodesU} × ${tb.nodesV} nodes (${tb.gridWords}). ` +
      (flagged
        ? `${flagged} nodes lie where the readings do not reach and are flagged: ${tb.outside} outside their convex hull (column \`outside\`), ${tb.far} inside it but farther than ${tb.reach} of each input's range from every reading (column \`far\`).`
        : `Every node lies inside the convex hull of the readings and within ${tb.reach} of each input's range of a reading.`),
    '',
    `![${md(input.figure.alt)}](${input.figure.file})`,
    '',
  );
  if (input.warnings.length) {
    out.push('## Warnings', '');
    for (const w of input.warnings) out.push(`- ${md(w)}`);
    out.push('');
  }
  out.push(
    '## Reproduce',
    '',
    'Run in the folder holding this report:',
    '',
    '```sh',
    input.regenerate,
    '```',
    '',
    `Check that the outputs are current: \`knotwise check ${md(input.recordFile)}\``,
    '',
  );
  if (input.emitted.length) out.push(`Code: ${input.emitted.map((e) => `\`${md(e)}\``).join(', ')}.`, '');
  out.push(`**Caution.** ${input.caution}`);
  return out.join('\n') + '\n';
}
