/**
 * The review report: a Markdown page that renders in a code review, with the figures as
 * SVG files beside it, the explanation of the chosen df, the candidate errors, residual
 * checks, influential rows, what the table holds (extrapolated and negative rows flagged),
 * the warnings, the data's provenance, how to reproduce it, and the caution.
 */
import { outcomeKind } from '../registry/outcomes/index';
import type { Analysis, Diagnostics } from '../analysis/types';
import type { RejectedRow } from '../ingest/select';
import { shellWord } from '../outputs/shellWord';
import { num } from '../plots/svg';
import { atPlace, percent, sig } from '../words/numbers';
import { dispersionNumbers, influenceBreakdown, thresholdWords } from '../words/checks';
import { DEFAULT_TOLERANCE_PERCENT, errorPlace } from '../tune/rules';
import type { TableSummary } from '../outputs/record';
import { metricLabel } from '../tune/format';
import type { FitResult } from '../types';
import { checkViews } from '../view/words';
import type { InverseSummary } from '../calibrate/inverseOutput';
import type { ReportFigure } from './figures';
import { formatRule, ruleWords } from '../registry/rules/index';
import { curveWords } from '../registry/curves/index';
import { resamplingWords } from '../registry/resampling/index';

/** Rows of long lists (rejected rows, influential rows, flagged x) shown before "... and N more". */
export const REPORT_LIST_LIMIT = 20;

/** What the report says. */
export interface ReportInput {
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly labels: { readonly x: string; readonly y: string; readonly weights?: string | undefined };
  readonly rowsRead: number;
  readonly rowsUsed: number;
  readonly rejected: readonly RejectedRow[];
  readonly fit: FitResult;
  readonly analysis?: Analysis | undefined;
  readonly diagnostics: Diagnostics;
  readonly table: TableSummary & { readonly file: string; readonly digits: number; readonly gridText: string };
  readonly figures: readonly ReportFigure[];
  readonly warnings: readonly string[];
  readonly recordFile: string;
  readonly regenerate: string;
  /** Names of the emitted code files. */
  readonly emitted: readonly string[];
  readonly caution: string;
  /** The inverse table and the drift from the recorded curve, when there are. */
  readonly calibration?: {
    readonly inverse?: { readonly file: string; readonly summary: InverseSummary; readonly words: string } | undefined;
    readonly drift?: { readonly words: string; readonly baseline: string; readonly figure?: ReportFigure | undefined } | undefined;
  };
}

/** The inverse table and the drift sections (empty when neither was made). */
function calibrationSections(input: ReportInput): string[] {
  const out: string[] = [];
  const inv = input.calibration?.inverse;
  if (inv) {
    out.push(
      '## Inverse table',
      '',
      `[${md(inv.file)}](${link(inv.file)}) gives the quantity (${md(input.labels.x)}) for a reading (${md(input.labels.y)}). ${md(inv.words)}`,
      '',
      `Intervals: ${md(inv.summary.method)}`,
      '',
    );
  }
  const drift = input.calibration?.drift;
  if (drift) out.push('## Drift from the recorded curve', '', `Compared with ${md(drift.baseline)}: ${md(drift.words)}`, '', ...figure(drift.figure));
  return out;
}

/** Text from the CSV or a file name, with Markdown and HTML punctuation escaped. */
export function md(text: string): string {
  return text.replace(/[\\`*_[\]<>|#!~&]/g, (c) => `\\${c}`).replace(/[\r\n]+/g, ' ');
}

/** A file name as a relative link target (spaces and parentheses percent-encoded). */
function link(file: string): string {
  return encodeURI(file).replace(/\(/g, '%28').replace(/\)/g, '%29');
}

/** Up to REPORT_LIST_LIMIT numbers, then "... and N more". */
function someNumbers(values: readonly number[]): string {
  const head = values
    .slice(0, REPORT_LIST_LIMIT)
    .map((v) => num(v, 6))
    .join(', ');
  return values.length > REPORT_LIST_LIMIT ? `${head}, … and ${values.length - REPORT_LIST_LIMIT} more` : head;
}

function figure(f: ReportFigure | undefined): string[] {
  // The image's alternative text carries the figure's description: an SVG shown as an image does not expose its own.
  return f ? [`![${md(f.description)}](${link(f.name)})`, '', `*${md(f.caption)}.*`, ''] : [];
}

function whyThisDf(a: Analysis | undefined, fit: FitResult): string[] {
  if (!a) return [`The df was given (${num(fit.df, 4)}); it was not tuned.`, ''];
  const t = a.tune;
  const s = t.selected;
  const out = [`${md(s.reason)}`, '', `Errors were estimated by ${md(resamplingWords(t.resample, t.seed))}; the rule is the ${md(ruleWords(s.rule))} (\`--rule ${formatRule(s.rule)}\`).`];
  if (t.holdout) {
    const h = t.holdout;
    // Three digits, as the held-out warning prints them (core/analysis/analysis.ts).
    out.push(
      '',
      `Held-out check (${h.rows} rows, ${num(100 * h.fraction, 3)} % set aside before tuning and used once): RMSE ${sig(h.rmse)} against the resampled ${sig(h.resampledRmse)}.${h.warning ? ` **${md(h.warning)}**` : ''}`,
    );
  }
  return [...out, ''];
}

function candidateTable(a: Analysis): string[] {
  const metric = a.tune.metric;
  const label = metricLabel(metric);
  // The decimal place of the explanation (errorPlace), so each mean reads here as it does there.
  const rule = a.tune.selected.rule;
  const place = errorPlace(a.tune.candidates, metric, rule.kind === 'simplest-within' ? rule.percent : DEFAULT_TOLERANCE_PERCENT);
  const out = [`| df | mean ${label} | SE | AIC | BIC | |`, '| ---: | ---: | ---: | ---: | ---: | --- |'];
  for (const c of a.tune.candidates) {
    if (c.skipped !== undefined) {
      out.push(`| ${num(c.df)} | | | | | skipped: ${md(c.skipped)} |`);
      continue;
    }
    const e = c.errors[metric];
    const chosen = c.df === a.tune.selected.df ? '**chosen**' : '';
    out.push(
      `| ${num(c.df)} | ${e ? atPlace(e.mean, place) : ''} | ${e && Number.isFinite(e.se) ? sig(e.se, 2) : ''} | ${c.aic !== undefined ? num(c.aic, 6) : ''} | ${c.bic !== undefined ? num(c.bic, 6) : ''} | ${chosen} |`,
    );
  }
  if (a.tune.selected.threshold !== undefined) out.push('', `Threshold of the rule: ${atPlace(a.tune.selected.threshold, place)}.`);
  return [...out, ''];
}

/** The influence thresholds with their sources, for the report. */
function thresholdList(inf: Diagnostics['influential']): string {
  return inf.thresholds.map((t) => `${thresholdWords(t)} (${md(t.source)})`).join('; ');
}

function checks(d: Diagnostics, fit: FitResult): string[] {
  const out = checkViews(d).map((c) => `- ${c.flagged ? '⚠ ' : ''}**${md(c.name)}**: ${md(c.text)}`);
  if (!out.length) out.push('- No residual check applies to this fit.');
  out.push(
    '',
    `Fit: residual SD ${num(fit.sigma)}, ${fit.model?.glm ? `deviance explained ${percent(fit.r2)}` : `R² ${num(fit.r2)}`}, exact leave-one-out RMSE ${num(fit.looRmse)}, GCV ${num(fit.gcv)}, AIC ${num(fit.aic, 6)}, BIC ${num(fit.bic, 6)}.`,
  );
  const inf = d.influential;
  if (d.exactFit) out.push('', 'The curve passes through every reading, so no row is judged for influence.');
  else if (inf.total === 0) out.push('', `No row stands out. Thresholds: ${thresholdList(inf)}.`);
  else {
    out.push('', `Rows that stand out: ${inf.total} (${md(influenceBreakdown(inf))}). Thresholds: ${thresholdList(inf)}.`, '');
    for (const r of inf.rows.slice(0, inf.shown)) {
      out.push(`- line ${r.line}: studentized residual ${num(r.studentized, 3)}, Cook's distance ${num(r.cooksDistance, 3)}, leverage ${num(r.leverage, 3)}`);
    }
    if (inf.total > inf.shown) out.push(`- … and ${inf.total - inf.shown} more (all are listed in the fit record)`);
  }
  return [...out, ''];
}

function tableSection(input: ReportInput): string[] {
  const t = input.table;
  const out = [
    `[${md(t.file)}](${link(t.file)}): ${t.points} rows from x = ${num(t.range[0], 6)} to ${num(t.range[1], 6)} (grid \`${t.gridText}\`), columns ${t.columns.map((c) => `\`${c}\``).join(', ')}, ${t.digits} significant digits. Bands are pointwise 95 %.`,
    '',
  ];
  const ip = t.interpolation;
  if (ip) {
    out.push(
      ip.tolerance !== null
        ? `Automatic step ${num(ip.step ?? NaN, 6)}: linear interpolation between adjacent rows stays within ${num(ip.maxError, 3)} of the curve (tolerance ${num(ip.tolerance, 3)}; largest at x = ${num(ip.at, 6)}).`
        : `Linear interpolation between adjacent rows stays within ${num(ip.maxError, 3)} of the curve (largest at x = ${num(ip.at, 6)}).`,
      '',
    );
  }
  const [lo, hi] = [input.fit.curve.lower, input.fit.curve.upper];
  out.push(
    t.extrapolated.length
      ? `**Extrapolated rows: ${t.extrapolated.length}** (outside the data range ${num(lo, 6)} to ${num(hi, 6)}; flagged in the \`extrapolated\` column): x = ${someNumbers(t.extrapolated)}.`
      : `No row is extrapolated: every x lies within the data range ${num(lo, 6)} to ${num(hi, 6)}.`,
  );
  if (t.negative !== null) {
    out.push(
      '',
      t.negative.length
        ? `**The curve is below zero at ${t.negative.length} rows** although the quantity was declared non-negative (flagged in the \`negative\` column): x = ${someNumbers(t.negative)}.`
        : 'The quantity was declared non-negative; the curve stays at or above zero at every row.',
    );
  }
  return [...out, ''];
}

function dataSection(input: ReportInput): string[] {
  const l = input.labels;
  const out = [
    `- File: ${md(input.dataFile)}, SHA-256 \`${input.dataSha256}\``,
    `- Columns: x = ${md(l.x)}, y = ${md(l.y)}${l.weights !== undefined ? `, weights = ${md(l.weights)}` : ''}`,
    `- Rows: ${input.rowsRead} read, ${input.rowsUsed} used, ${input.rejected.length} rejected`,
  ];
  for (const r of input.rejected.slice(0, REPORT_LIST_LIMIT)) out.push(`  - line ${r.line}${r.column ? ` (${md(r.column)})` : ''}: ${md(r.reason)}`);
  if (input.rejected.length > REPORT_LIST_LIMIT) out.push(`  - … and ${input.rejected.length - REPORT_LIST_LIMIT} more (all are listed in the fit record)`);
  return [...out, ''];
}

/**
 * What the fit assumed beyond least squares: the outcome family and link, the shape
 * constraints with how many are active, and the robust fit with the rows it down-weighted
 * by CSV line. Empty for a plain least-squares fit.
 */
function modelSection(fit: FitResult): string[] {
  const m = fit.model;
  if (!m) return [];
  const out = ['## Model', ''];
  const kind = outcomeKind(m.outcome);
  const outcome = kind.glm ? `${m.outcome} (${kind.distribution}, ${m.link} link), fitted by iteratively reweighted least squares` : `${m.outcome} (${kind.distribution} errors, least squares)`;
  out.push(`- Readings: ${outcome}; ${m.converged ? `converged in ${m.iterations} iteration${m.iterations === 1 ? '' : 's'}` : `**did not converge** in ${m.iterations} iterations`}.`);
  if (m.glm)
    out.push(
      `- Deviance explained ${percent(1 - m.glm.deviance / m.glm.nullDeviance)} (deviance ${num(m.glm.deviance, 6)}; ${num(m.glm.nullDeviance, 6)} for a flat curve); ${dispersionNumbers({ ratio: m.glm.dispersion, residualDf: fit.residualDf, pearsonChi2: m.glm.pearsonChi2 })} over the residual df. Bands are computed on the ${m.link} scale and mapped back.`,
    );
  if (m.shape.length) {
    const c = m.constraints;
    out.push(
      `- Shape: ${m.shape.join(', ')}, imposed on the B-spline coefficients so that it holds everywhere in the data range${c ? `; ${c.active} of ${c.total} constraints are active (effective df ${num(c.effectiveDf, 4)})` : ''}. Bands treat the active constraints as known (an approximation).`,
    );
  }
  if (m.robust) {
    const r = m.robust;
    const listed = r.downweighted.rows.map((row) => `line ${row.line} (weight ${num(row.weight, 3)})`).join(', ');
    out.push(
      `- Robust fit: Huber M-estimation, k = ${num(r.k, 4)}, robust scale ${num(r.scale, 4)}; ${r.downweighted.total} row${r.downweighted.total === 1 ? '' : 's'} down-weighted${listed ? `: ${listed}` : ''}${r.downweighted.total > r.downweighted.rows.length ? ', ...' : ''}.`,
    );
  }
  out.push('');
  return out;
}

/**
 * The report's Markdown text (LF, final newline). Figures are referenced by relative file
 * name, so the page renders wherever it is committed beside them. Deterministic: no dates,
 * no tool version. O(candidates + listed rows).
 * Example: reportMarkdown(input).startsWith('# Curve review: ').
 */
export function reportMarkdown(input: ReportInput): string {
  const { fit, analysis: a } = input;
  const fig = (key: string): ReportFigure | undefined => input.figures.find((f) => f.name.endsWith(`.report.${key}.svg`));
  const lines: string[] = [
    `# Curve review: ${md(input.dataFile)}`,
    '',
    `> **Caution.** ${md(input.caution)}`,
    '',
    `A ${curveWords(fit.kind)} with df ${num(fit.df, 4)} was fitted to ${input.rowsUsed} rows of ${md(input.dataFile)} (${md(input.labels.y)} against ${md(input.labels.x)})${a?.options.holdout ? `, of which ${a.n} were used for fitting and the rest held out` : ''}. The curve table ${md(input.table.file)} has ${input.table.points} rows.`,
    '',
  ];
  if (input.warnings.length) lines.push('## Warnings', '', ...input.warnings.map((w) => `- ⚠ ${md(w)}`), '');
  lines.push(...modelSection(fit));
  lines.push('## The curve', '', ...figure(fig('curve')), '## Why this df', '', ...whyThisDf(a, fit));
  if (a) lines.push(...figure(fig('error')), ...candidateTable(a));
  lines.push('## Residual checks', '', ...checks(input.diagnostics, fit), ...figure(fig('residuals-x')), ...figure(fig('residuals-fitted')), ...figure(fig('normal-quantiles')));
  const notes = [...fit.notes, ...(a ? a.tune.notes : [])];
  if (notes.length) lines.push('## Notes', '', ...notes.map((n) => `- ${md(n)}`), '');
  lines.push('## Curve table', '', ...tableSection(input), ...calibrationSections(input), '## Data', '', ...dataSection(input));
  lines.push(
    '## Reproduce and check',
    '',
    `Fit record: [${md(input.recordFile)}](${link(input.recordFile)})${input.emitted.length ? `; generated code: ${input.emitted.map((e) => `[${md(e)}](${link(e)})`).join(', ')}` : ''}.`,
    '',
    'Regenerate every output (in the folder holding this report), and check that they are current:',
    '',
    '```sh',
    input.regenerate,
    `knotwise check ${shellWord(input.recordFile)}`,
    '```',
    '',
  );
  return lines.join('\n');
}
