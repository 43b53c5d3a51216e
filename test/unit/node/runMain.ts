/**
 * Test helper: runs the command line's `main` in this process with stdout and stderr
 * captured, and copies R's data sets (written by test/e2e/fixtures/make-fixtures.R) into
 * temporary folders.
 */
import { copyFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { runCheck } from '../../../core/node/check';
import { type CliEnv, main } from '../../../core/node/cli';

export const REPO = join(__dirname, '..', '..', '..');

/** What one run printed and returned. */
export interface Run {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/**
 * Runs `main(argv)` with output captured. Standard input is empty and standard error is not
 * a terminal, whatever the test runner's are, so no progress line shows by itself.
 */
export async function runMain(...argv: string[]): Promise<Run> {
  return runMainWith({}, ...argv);
}

/** Runs `main(argv)` with output captured and `env` (standard input, progress stream, clock) injected. */
export async function runMainWith(env: Partial<CliEnv>, ...argv: string[]): Promise<Run> {
  return captured(() =>
    main(argv, {
      readStdin: () => Promise.resolve(new Uint8Array(0)),
      stdinIsTTY: false,
      progressStream: { write: (t: string) => process.stderr.write(t), isTTY: false },
      ...env,
    }),
  );
}

/** Runs `knotwise check` in `cwd` (core/node/check.ts runCheck) with output captured. */
export async function runCheckIn(cwd: string, ...argv: string[]): Promise<Run> {
  return captured(() => runCheck(argv, cwd));
}

/** Runs `command` with this process's stdout and stderr captured; returns its exit code and what it printed. */
async function captured(command: () => Promise<number>): Promise<Run> {
  let stdout = '';
  let stderr = '';
  const out = process.stdout.write;
  const err = process.stderr.write;
  process.stdout.write = ((chunk: string | Uint8Array) => ((stdout += String(chunk)), true)) as typeof process.stdout.write;
  process.stderr.write = ((chunk: string | Uint8Array) => ((stderr += String(chunk)), true)) as typeof process.stderr.write;
  try {
    const code = await command();
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
