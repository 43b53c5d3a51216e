/**
 * What every code emitter shares: its input, the generated-file comment, and the text of
 * each table value (the same digits as the CSV, so a program reads the table's numbers).
 */
import { FLAG_COLUMNS, type TableColumn } from '../table/curveTable';
import { shellWord } from '../outputs/shellWord';
import { formatNumber } from '../table/formatCsv';

/** The code emitters: C header, TypeScript module, JSON. */
export const EMIT_KINDS = ['c', 'ts', 'json'] as const;
export type EmitKind = (typeof EMIT_KINDS)[number];

/** A table to emit: its column names and one row of numbers per grid point (first column: the key). */
export interface EmitTable {
  readonly columns: readonly string[];
  readonly rows: readonly (readonly number[])[];
}

/**
 * Which table an emitter writes: the curve table (key column x), or the inverse table
 * (key column `reading`: from a reading back to the quantity, core/calibrate/inverse.ts).
 */
export type EmitPart = 'curve' | 'inverse';

/** What an emitter needs. */
export interface EmitInput {
  /** Base of the generated names: the data file's name without its extension. */
  readonly stem: string;
  /** The table as written (its column set); the first column is the key (x, or reading). */
  readonly table: EmitTable;
  /** The curve table (default) or the inverse table. */
  readonly part?: EmitPart | undefined;
  /** The inverse table's key range: the curve's readings over the data range. */
  readonly readingRange?: readonly [number, number] | undefined;
  /** The inverse table's method in one sentence (source named), for the generated comment. */
  readonly method?: string | undefined;
  /** Significant digits of the table values. */
  readonly digits: number;
  /** The data file's name and the SHA-256 of its bytes. */
  readonly source: { readonly file: string; readonly sha256: string };
  /** The curve in words, e.g. "natural cubic regression spline, df 5". */
  readonly curve: string;
  /** Names of the x and y columns in the data. */
  readonly labels: { readonly x: string; readonly y: string };
  /** Smallest and largest x of the data the curve was fitted to. */
  readonly dataRange: readonly [number, number];
  /** Step of a uniform grid; undefined when the x are not evenly spaced. */
  readonly step?: number | undefined;
  /** File name of the fit record beside the generated file. */
  readonly recordFile: string;
  /** Command that regenerates every output, run in the folder holding them. */
  readonly regenerate: string;
  readonly caution: string;
}

/** What each column of the inverse table holds, for the generated comment. */
export const INVERSE_COLUMN_WORDS: Readonly<Record<string, string>> = {
  reading: 'reading (the y of the fit), the key of the table',
  quantity: 'estimated quantity: the x at which the fitted curve equals the reading',
  lower: 'lower end of the 95 % inverse-prediction (calibration) interval of the quantity; NaN where the interval is open',
  upper: 'upper end of the 95 % inverse-prediction (calibration) interval of the quantity; NaN where the interval is open',
  open: '1 where an end of the interval lies beyond the data range (that end is NaN), else 0',
  wide: '1 where the interval is wider than the width limit asked for, else 0',
  outside: '1 where the reading lies outside what the curve reaches over the data range (no quantity), else 0',
};

/** 0/1 flag columns of the inverse table. */
export const INVERSE_FLAGS: readonly string[] = ['open', 'wide', 'outside'];

/** What each column holds, for the generated comment. */
export const COLUMN_WORDS: Readonly<Record<TableColumn, string>> = {
  x: 'x',
  fit: 'fitted curve',
  se: 'standard error of the fitted curve',
  ciLower: 'lower end of the 95 % confidence band of the curve',
  ciUpper: 'upper end of the 95 % confidence band of the curve',
  piLower: 'lower end of the 95 % prediction band for a new reading',
  piUpper: 'upper end of the 95 % prediction band for a new reading',
  extrapolated: '1 where x lies outside the data range (extrapolated), else 0',
  negative: '1 where the fitted curve is below zero although the quantity cannot be negative, else 0',
};

/** True for 0/1 flag columns (of the curve table or the inverse table). */
export function isFlag(column: string): boolean {
  return (FLAG_COLUMNS as readonly string[]).includes(column) || INVERSE_FLAGS.includes(column);
}

/** Table values of column `j` as printed in the CSV (flags as 0/1). */
export function columnTexts(table: EmitTable, j: number, digits: number): string[] {
  const flag = isFlag(table.columns[j] as string);
  return table.rows.map((r) => (flag ? String(r[j]) : formatNumber(r[j] as number, digits)));
}

/** A value as printed in the CSV, read back as a number (what a program reading the table gets). */
export function printedValue(v: number, digits: number): number {
  return Number.isFinite(v) ? Number(formatNumber(v, digits)) : v;
}

/** Splits text into lines of at most `width` characters at spaces (a longer word keeps its own line). */
export function wrap(text: string, width: number): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/).filter((w) => w !== '')) {
    if (line !== '' && line.length + 1 + word.length > width) {
      out.push(line);
      line = word;
    } else line = line === '' ? word : `${line} ${word}`;
  }
  if (line !== '') out.push(line);
  return out;
}

/** Control characters removed, so a file name cannot break a comment line. */
function oneLine(text: string): string {
  // eslint-disable-next-line no-control-regex -- control characters are what this removes
  return text.replace(/[\u0000-\u001f\u007f]/g, ' ');
}

/**
 * The comment lines at the top of every generated file: generated-by notice, source file and
 * SHA-256, curve, rows and range, column meanings, how to regenerate and check, caution.
 * Deterministic: no dates, no tool version (the fit record has it), so a rerun gives the same bytes.
 */
export function noticeLines(input: EmitInput, width = 92): string[] {
  const t = input.table;
  const inverse = input.part === 'inverse';
  const key = inverse ? 'reading' : 'x';
  const xs = t.rows.map((r) => r[0] as number);
  const first = xs[0];
  const last = xs[xs.length - 1];
  const rows =
    `${t.rows.length} rows` +
    (first !== undefined && last !== undefined ? ` from ${key} = ${formatNumber(first, input.digits)} to ${key} = ${formatNumber(last, input.digits)}` : '') +
    (input.step !== undefined ? `, step ${formatNumber(input.step, input.digits)}` : '') +
    '.';
  const words = (c: string): string => {
    if (inverse) return c === 'reading' ? `reading of ${oneLine(input.labels.y)}` : c === 'quantity' ? `estimated ${oneLine(input.labels.x)}` : (INVERSE_COLUMN_WORDS[c] ?? c);
    return c === 'x' ? oneLine(input.labels.x) : c === 'fit' ? `fitted ${oneLine(input.labels.y)}` : (COLUMN_WORDS[c as TableColumn] ?? c);
  };
  const range = input.readingRange;
  return [
    'Generated by Knotwise. Do not edit by hand: regenerate it instead.',
    `Source data: ${oneLine(input.source.file)}`,
    `SHA-256 of the data: ${input.source.sha256}`,
    inverse ? `Inverse of the curve: ${input.curve}; ${rows}` : `Curve: ${input.curve}; ${rows}`,
    `Data range of x: ${formatNumber(input.dataRange[0], input.digits)} to ${formatNumber(input.dataRange[1], input.digits)}.`,
    ...(inverse && range ? [`Readings the curve reaches over that range: ${formatNumber(range[0], input.digits)} to ${formatNumber(range[1], input.digits)}.`] : []),
    ...(inverse && input.method ? wrap(`Intervals: ${input.method}`, width) : []),
    'Columns:',
    ...t.columns.map((c) => `  ${c}: ${words(c)}`),
    'Regenerate (run in the folder holding this file):',
    `  ${oneLine(input.regenerate)}`,
    'Check that it is current:',
    `  knotwise check ${shellWord(oneLine(input.recordFile))}`,
    ...wrap(`Caution: ${input.caution}`, width),
  ];
}
