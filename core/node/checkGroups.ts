/**
 * `knotwise check` of a group record (core/groups/deliver.ts): the grouped fit is rebuilt
 * from the data and the record's spec, and every table, the summary and the record itself
 * are compared byte for byte with the files on disk, as for a fit record.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import { InputError } from '../errors';
import { compareFile, jsonDifferences, printable } from '../outputs/compare';
import { readGroupRecord } from '../outputs/groupRecordPlan';
import { fitCommand } from '../outputs/plan';
import type { CheckResult } from './check';
import { runGroupPipeline } from './groupPipeline';
import { sha256 } from './outputs';
import { portableRelative } from './pipeline';

/** Differences of the record listed in its message before "and N more". */
const SHOWN = 3;

/** Checks one group record; never throws (a problem is status 'error'). */
export async function checkGroupRecord(recordPath: string, bytes: Uint8Array, json: unknown): Promise<CheckResult> {
  const done = (r: CheckResult): CheckResult => ({ ...r, messages: r.messages.map(printable), notes: r.notes.map(printable) });
  let rec;
  try {
    rec = readGroupRecord(json, recordPath);
  } catch (e) {
    return done({ record: recordPath, status: 'error', messages: [e instanceof InputError ? e.describe() : String(e)], notes: [] });
  }
  const folder = dirname(recordPath);
  const dataFile = resolve(folder, rec.dataPath);
  const regenerate = fitCommand(rec.plan, portableRelative(folder, dataFile));
  const base = { record: recordPath, notes: [], regenerate, writtenBy: rec.toolVersion };
  const outside = rec.files.find((f) => isAbsolute(f.file) || relative(resolve(folder), resolve(folder, f.file)).split(sep)[0] === '..');
  if (outside) return done({ ...base, status: 'error', messages: [`the record names an output outside its folder: ${outside.file}`] });
  if (!existsSync(dataFile)) return done({ ...base, status: 'error', messages: [`the data file ${rec.dataPath} (data.path in the record) was not found`] });
  const messages: string[] = [];
  let run;
  try {
    run = await runGroupPipeline(dataFile, rec.plan, folder);
  } catch (e) {
    const sha = sha256(readFileSync(dataFile));
    const why = e instanceof InputError ? e.describe() : String(e);
    if (sha !== rec.dataSha256)
      return done({
        ...base,
        status: 'changed',
        messages: [`data ${rec.dataPath} changed: SHA-256 was ${rec.dataSha256.slice(0, 16)}..., now ${sha.slice(0, 16)}...`, `the outputs cannot be rebuilt from it: ${why}`],
      });
    return done({ ...base, status: 'error', messages: [`the outputs cannot be rebuilt: ${why}`] });
  }
  if (run.table.sha256 !== rec.dataSha256) messages.push(`data ${rec.dataPath} changed: SHA-256 was ${rec.dataSha256.slice(0, 16)}..., now ${run.table.sha256.slice(0, 16)}...`);
  for (const f of run.deliverables.files) {
    if (f.kind === 'record') {
      const want = Buffer.from(f.text, 'utf8');
      if (Buffer.compare(Buffer.from(bytes), want) === 0) continue;
      const diffs = jsonDifferences(json, JSON.parse(f.text) as unknown);
      const listed = diffs.slice(0, SHOWN).map((d) => `${d.path || '(the record)'}: ${d.found} in the file, ${d.rebuilt} rebuilt`);
      messages.push(
        diffs.length
          ? `${f.name} differs from the rebuilt record in ${diffs.length} value${diffs.length === 1 ? '' : 's'}: ${listed.join('; ')}${diffs.length > SHOWN ? `; and ${diffs.length - SHOWN} more` : ''}.`
          : `${f.name}: every value is as rebuilt; only the text differs, and records are compared byte for byte`,
      );
      continue;
    }
    const path = join(folder, f.name);
    if (!existsSync(path)) {
      messages.push(`${f.name} is missing`);
      continue;
    }
    const d = compareFile(f.name, readFileSync(path), f.text, f.name.endsWith('.curve.csv') ? (f.text.split('\n')[0] as string).split(',') : undefined);
    if (d) messages.push(d);
  }
  return done({ ...base, status: messages.length ? 'changed' : 'current', messages });
}
