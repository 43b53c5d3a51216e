/**
 * Test helper: runs the command line's `main` in this process with stdout and stderr
 * captured, and copies R's data sets (written by test/e2e/fixtures/make-fixtures.R) into
 * temporary folders.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { main } from '../../../core/node/cli';

export const REPO = join(__dirname, '..', '..', '..');

/** What one run printed and returned. */
export interface Run {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs `main(argv)` with output captured. */
export async function runMain(...argv: string[]): Promise<Run> {
  let stdout = '';
  let stderr = '';
  const out = process.stdout.write;
  const err = process.stderr.write;
  process.stdout.write = ((chunk: string | Uint8Array) => ((stdout += String(chunk)), true)) as typeof process.stdout.write;
  process.stderr.write = ((chunk: string | Uint8Array) => ((stderr += String(chunk)), true)) as typeof process.stderr.write;
  try {
    const code = await main(argv);
    return { code, stdout, stderr };
  } finally {
    process.stdout.write = out;
    process.stderr.write = err;
  }
}

/** Copies test/e2e/fixtures/<name> (MASS::mcycle, datasets::cars) to `target`, creating its folder. */
export function copyFixture(name: 'mcycle.csv' | 'cars.csv', target: string): string {
  mkdirSync(dirname(target), { recursive: true });
  copyFileSync(join(REPO, 'test', 'e2e', 'fixtures', name), target);
  return target;
}
