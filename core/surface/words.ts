import { errorFormat } from '../tune/rules';
import { metricLabel } from '../tune/format';
import type { SurfaceNames } from './data';
import type { SurfaceTuneResult } from './tune';

/**
 * The error landscape as lines of text: a title, then one row per candidate df of u and one
 * column per candidate df of v, each cell the mean error printed as the explanation prints
 * it (errorFormat), '-' where the pair was skipped, and the chosen pair marked with '*'.
 * Example: landscapeLines(result, names)[0] -> 'Mean RMSE by df of Temp (rows) and df of Wind (columns); * marks df 4 × 3:'.
 */
export function landscapeLines(result: SurfaceTuneResult, names: Pick<SurfaceNames, 'u' | 'v'>): string[] {
  const { landscape, selected, candidates, metric } = result;
  const asCurves = candidates.map((c, r) => ({ df: r + 1, errors: c.errors, ...(c.skipped !== undefined ? { skipped: c.skipped } : {}) }));
  const num = errorFormat(asCurves, metric);
  const cells = landscape.dfU.map((du, i) =>
    landscape.dfV.map((dv, j) => {
      const m = landscape.mean[i * landscape.dfV.length + j] as number;
      const mark = du === selected.dfU && dv === selected.dfV ? '*' : '';
      return Number.isFinite(m) ? `${num(m)}${mark}` : '-';
    }),
  );
  const head = ['', ...landscape.dfV.map(String)];
  const rows = landscape.dfU.map((du, i) => [String(du), ...(cells[i] as string[])]);
  const widths = head.map((_, c) => Math.max(...[head, ...rows].map((r) => (r[c] as string).length)));
  const line = (r: readonly string[]): string => r.map((s, c) => s.padStart(widths[c] as number)).join('  ');
  return [`Mean ${metricLabel(metric)} by df of ${names.u} (rows) and df of ${names.v} (columns); * marks df ${selected.dfU} × ${selected.dfV}:`, line(head), ...rows.map(line)];
}
