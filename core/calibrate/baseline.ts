/**
 * The baseline of a fit record: the curve sample of the record it replaced, so that the
 * drift from that curve can be shown by `fit`, kept in the record, drawn in the report and
 * rebuilt byte for byte by `check`. One rule decides it: when the new curve's sample equals
 * the replaced record's own (the same curve written again), the replaced record's baseline
 * is carried over, so rewriting outputs never loses the comparison and a rerun gives the
 * same bytes; otherwise the replaced record's curve becomes the baseline.
 */
import { sig } from '../words/numbers';
import { checkSample, type CurveSample } from './drift';

/** The curve a record replaced: its data's SHA-256, curve kind and df, and its sample. */
export interface Baseline {
  readonly data: { readonly sha256: string };
  readonly fit: { readonly curve: string; readonly df: number };
  readonly sample: CurveSample;
}

type Json = Readonly<Record<string, unknown>>;

const isObject = (v: unknown): v is Json => v !== null && typeof v === 'object' && !Array.isArray(v);

/** A record's curve sample, or undefined when it has none usable (an older record, or a malformed one). */
export function recordSample(record: unknown): CurveSample | undefined {
  if (!isObject(record) || !isObject(record.curveSample)) return undefined;
  const s = record.curveSample as unknown as CurveSample;
  try {
    checkSample(s);
    return s;
  } catch {
    return undefined;
  }
}

/** A record's own baseline, or null. */
function recordBaseline(record: Json): Baseline | null {
  const b = record.baseline;
  if (!isObject(b) || !isObject(b.data) || !isObject(b.fit) || typeof b.data.sha256 !== 'string') return null;
  const sample = recordSample({ curveSample: b.sample });
  if (!sample || typeof b.fit.curve !== 'string' || typeof b.fit.df !== 'number') return null;
  return { data: { sha256: b.data.sha256 }, fit: { curve: b.fit.curve, df: b.fit.df }, sample };
}

/** Canonical text of a sample, for equality. */
const sampleText = (s: CurveSample): string => JSON.stringify([s.lower, s.upper, s.level, s.t, s.outcome, s.x, s.fit, s.se]);

/**
 * The baseline of a new record whose curve sample is `sample`, given the parsed record it
 * replaces (`previous`, undefined when there is none). Null when there is nothing to
 * compare with. O(sample size).
 * Example: chooseBaseline(undefined, sample) -> null.
 */
export function chooseBaseline(previous: unknown, sample: CurveSample): Baseline | null {
  if (!isObject(previous)) return null;
  const old = recordSample(previous);
  if (!old) return null;
  if (sampleText(old) === sampleText(sample)) return recordBaseline(previous);
  const data = isObject(previous.data) && typeof previous.data.sha256 === 'string' ? previous.data.sha256 : '';
  const fit = isObject(previous.fit) ? previous.fit : {};
  return {
    data: { sha256: data },
    fit: { curve: typeof fit.curve === 'string' ? fit.curve : 'unknown', df: typeof fit.df === 'number' ? fit.df : NaN },
    sample: old,
  };
}

/** The baseline in words: "the recorded curve (natural spline, df 5, data SHA-256 3f2a...)". */
export function baselineWords(b: Baseline): string {
  return `the curve of the record this one replaced (${b.fit.curve}, df ${sig(b.fit.df, 4)}, data SHA-256 ${b.data.sha256.slice(0, 12)}…)`;
}
