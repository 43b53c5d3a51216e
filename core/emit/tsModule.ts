/**
 * The curve table as a TypeScript module: one exported read-only array per column, the
 * length, the x range of the table and of the data, and a comment saying it is generated,
 * from what data and how to regenerate it.
 */
import { columnTexts, isFlag, noticeLines, type EmitInput } from './common';
import { formatNumber } from '../table/formatCsv';

/** Values per line inside an array literal. */
const PER_LINE = 6;

/** A CSV number as a TypeScript number literal. */
function tsLiteral(text: string): string {
  if (text === 'Inf') return 'Infinity';
  if (text === '-Inf') return '-Infinity';
  return text;
}

/**
 * The module text: `length`, `source` ({file, sha256}), `xFirst`, `xLast`, `dataXMin`,
 * `dataXMax`, `xStep` (null when the x are not evenly spaced), and one
 * `readonly number[]` (flags: `readonly (0 | 1)[]`) per column, named as the column. The
 * values are the CSV's text. Type-checks under `strict`. LF line ends, final newline.
 * O(rows x columns). Example: tsModule(input) contains "export const fit: readonly number[] = [".
 */
export function tsModule(input: EmitInput): string {
  const t = input.table;
  const num = (v: number): string => tsLiteral(formatNumber(v, input.digits));
  const xs = t.rows.map((r) => r[0] as number);
  const inverse = input.part === 'inverse';
  const key = inverse ? 'reading' : 'x';
  const out: string[] = [
    ...noticeLines(input).map((l) => `// ${l}`.trimEnd()),
    '',
    '/** Number of rows of every array below. */',
    `export const length = ${t.rows.length};`,
    '/** The data file the curve was fitted to, and the SHA-256 of its bytes. */',
    `export const source = { file: ${JSON.stringify(input.source.file)}, sha256: ${JSON.stringify(input.source.sha256)} } as const;`,
    `/** First and last ${key} of the table. */`,
    `export const ${key}First: number = ${xs.length ? num(xs[0] as number) : 'NaN'};`,
    `export const ${key}Last: number = ${xs.length ? num(xs[xs.length - 1] as number) : 'NaN'};`,
    `/** Range of x in the data; ${inverse ? 'the quantity is never estimated outside it' : 'table rows outside it are extrapolated'}. */`,
    `export const dataXMin: number = ${num(input.dataRange[0])};`,
    `export const dataXMax: number = ${num(input.dataRange[1])};`,
    ...(inverse && input.readingRange
      ? [
          '/** Readings the curve reaches over the data range; rows outside it are flagged in outside. */',
          `export const readingMin: number = ${num(input.readingRange[0])};`,
          `export const readingMax: number = ${num(input.readingRange[1])};`,
        ]
      : []),
    `/** Step between consecutive ${key}, or null when they are not evenly spaced. */`,
    `export const ${key}Step: number | null = ${input.step !== undefined ? num(input.step) : 'null'};`,
  ];
  t.columns.forEach((c, j) => {
    const flag = isFlag(c);
    const values = columnTexts(t, j, input.digits).map(tsLiteral);
    out.push('', `export const ${c}: readonly ${flag ? '(0 | 1)' : 'number'}[] = [`);
    for (let i = 0; i < values.length; i += PER_LINE) out.push(`  ${values.slice(i, i + PER_LINE).join(', ')},`);
    out.push('];');
  });
  return out.join('\n') + '\n';
}
