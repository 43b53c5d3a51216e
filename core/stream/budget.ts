/**
 * The memory budget: above it a file is streamed from disk in passes instead of held
 * (docs/design.md, "Streaming"). The rule estimates the memory a whole read would take from
 * the file's size and the bytes per row of its first part.
 */
import { InputError } from '../errors';

/** Default budget in MiB: whole reads up to about 1.7 million rows of two columns. */
export const DEFAULT_MEMORY_BUDGET = 320;
/** Smallest and largest budget accepted, in MiB. */
export const MEMORY_BUDGET_LIMITS = { min: 1, max: 1_048_576 } as const;
/** What a whole read needs besides the rows: the program, the output texts, the workers (MiB; measured by `npm run bench`). */
export const BASE_MIB = 96;
/**
 * Bytes a whole read needs per row besides its typed columns: the line number, the sort
 * order, the cells and positions of the power sums, fitted values, residuals and leverage of
 * the chosen fit and the residual checks' copies (about 120 bytes, measured by `npm run bench`).
 */
export const BYTES_PER_ROW = 120;

/**
 * Estimated MiB a whole read of a file of `fileBytes` bytes needs, when its first
 * `sampleBytes` bytes held `sampleRows` lines of `columns` fields:
 * BASE_MIB + rows x (8 columns + BYTES_PER_ROW) / 2^20, with rows = fileBytes x
 * sampleRows / sampleBytes. O(1).
 * Example: 10,000,000 rows of two columns -> about 1,393 MiB.
 */
export function estimatedMiB(fileBytes: number, sampleBytes: number, sampleRows: number, columns: number): number {
  const rows = sampleBytes > 0 ? (fileBytes * Math.max(1, sampleRows)) / sampleBytes : 0;
  return BASE_MIB + (rows * (8 * Math.max(1, columns) + BYTES_PER_ROW)) / 2 ** 20;
}

/** Reads a budget in MiB as the command line and the setting give it. Throws InputError outside the limits. */
export function parseMemoryBudget(text: string): number {
  const v = Number(text.trim());
  if (!Number.isInteger(v) || v < MEMORY_BUDGET_LIMITS.min || v > MEMORY_BUDGET_LIMITS.max) {
    throw new InputError(`the memory budget is a whole number of MiB from ${MEMORY_BUDGET_LIMITS.min} to ${MEMORY_BUDGET_LIMITS.max}; got "${text}"`);
  }
  return v;
}
