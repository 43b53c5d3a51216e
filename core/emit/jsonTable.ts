/**
 * The curve table as JSON for programs: the columns as arrays of numbers, with where the
 * data came from and how to regenerate it.
 */
import { printedValue, type EmitInput } from './common';

/**
 * The JSON text (2-space indent, LF, final newline): `generatedBy`, `source` ({file,
 * sha256}), `record`, `regenerate`, `curve`, `length`, `xFirst`, `xLast`, `dataXMin`,
 * `dataXMax`, `xStep` (null when uneven), `columns` ({name: number[]}) and `caution`. Values
 * are the CSV's numbers (read back from the printed text); non-finite values are null.
 * O(rows x columns). Example: JSON.parse(jsonTable(input)).columns.fit[0].
 */
export function jsonTable(input: EmitInput): string {
  const t = input.table;
  const v = (x: number): number | null => {
    const p = printedValue(x, input.digits);
    return Number.isFinite(p) ? p : null;
  };
  const xs = t.rows.map((r) => r[0] as number);
  const columns: Record<string, (number | null)[]> = {};
  t.columns.forEach((c, j) => {
    columns[c] = t.rows.map((r) => v(r[j] as number));
  });
  const inverse = input.part === 'inverse';
  const key = inverse ? 'reading' : 'x';
  const doc = {
    generatedBy: 'knotwise',
    source: { file: input.source.file, sha256: input.source.sha256 },
    record: input.recordFile,
    regenerate: input.regenerate,
    curve: input.curve,
    ...(inverse ? { table: 'inverse', method: input.method ?? null } : {}),
    length: t.rows.length,
    [`${key}First`]: xs.length ? v(xs[0] as number) : null,
    [`${key}Last`]: xs.length ? v(xs[xs.length - 1] as number) : null,
    dataXMin: v(input.dataRange[0]),
    dataXMax: v(input.dataRange[1]),
    ...(inverse && input.readingRange ? { readingMin: v(input.readingRange[0]), readingMax: v(input.readingRange[1]) } : {}),
    [`${key}Step`]: input.step !== undefined ? v(input.step) : null,
    columns,
    caution: input.caution,
  };
  return JSON.stringify(doc, null, 2) + '\n';
}
