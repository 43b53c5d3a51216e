/**
 * `knotwise compare <earlier.fit.json> <later.fit.json>`: how far the later record's curve
 * lies from the earlier one's over their common x range, against their pointwise standard
 * errors (core/calibrate/drift.ts, from the curve samples both records keep). Reads the two
 * records only; no data is needed. Exit code 0 when the later curve stays within the
 * earlier one's band everywhere, 1 when it leaves it (or the ranges do not overlap), 2 when
 * a record cannot be read.
 */
import { readFileSync } from 'node:fs';
import { driftBetweenSamples, driftJson, type Drift } from '../calibrate/drift';
import { InputError } from '../errors';
import { readRecordFile } from '../outputs/recordPlan';
import { defineCommand, formatHelp, parseCommand } from './args';
import { recordSample } from '../calibrate/baseline';

export const COMPARE_COMMAND = defineCommand({
  name: 'compare',
  summary: "say how far one fit record's curve lies from another's, against their bands",
  usage: ['compare <earlier.fit.json> <later.fit.json> [--json]'],
  operands: { min: 2, max: 2, name: 'fit record' },
  options: [{ name: 'json', help: 'print one JSON object instead of the sentence' }],
  notes: [
    'The records keep their curves sampled at 257 evenly spaced x over their data ranges; the later curve is read between its points by cubic interpolation, whose error bound is part of the JSON output.',
    "Exit codes: 0 the later curve stays within the earlier one's 95 % band everywhere both cover; 1 it leaves the band, or cannot be judged, or the ranges do not overlap; 2 a record cannot be read.",
  ],
});

/** Reads a record file and its curve sample; InputError when either is missing. */
function sampleOf(path: string): { sample: NonNullable<ReturnType<typeof recordSample>>; df: number } {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, not a fit record' : String(e), { file: path });
  }
  const read = readRecordFile(bytes, path);
  const sample = recordSample(read.json);
  if (!sample) throw new InputError('the record holds no usable curve sample (curveSample)', { file: path });
  return { sample, df: read.run.df };
}

/** The JSON object `compare --json` prints. */
export function compareJson(earlier: string, later: string, d: Drift | null): Record<string, unknown> {
  return {
    earlier,
    later,
    overlap: d !== null,
    drift: d ? { ...driftJson(d), interpolationBound: Number.isFinite(d.interpolationBound) ? d.interpolationBound : null } : null,
  };
}

/** Runs `knotwise compare`; returns the exit code. Throws InputError for bad options or records. */
export function runCompare(argv: readonly string[]): number {
  const a = parseCommand(COMPARE_COMMAND, argv);
  if (a.help) {
    process.stdout.write(formatHelp(COMPARE_COMMAND) + '\n');
    return 0;
  }
  const [earlier, later] = a.operands as [string, string];
  const before = sampleOf(earlier);
  const after = sampleOf(later);
  const d = driftBetweenSamples(before.sample, after.sample);
  if (a.flag('json')) process.stdout.write(JSON.stringify(compareJson(earlier, later, d)) + '\n');
  else process.stdout.write(`${d ? `${later} against ${earlier}: ${d.words}` : `${later} and ${earlier} share no x range: the curves cannot be compared`}\n`);
  return d && d.withinRecordedBand === true ? 0 : 1;
}
