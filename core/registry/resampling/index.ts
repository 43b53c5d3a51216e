/**
 * The registry of resampling schemes: every scheme listed once. Parsers, settings,
 * the record, view words and the engine read it; adding a scheme is one module plus one
 * line here (and its member of ResampleSpec in core/tune/types.ts).
 */
import { InputError } from '../../errors';
import type { ResampleSpec } from '../../tune/types';
import { bootstrap } from './bootstrap';
import { bundles } from './bundles';
import { folds } from './folds';
import { gcv } from './gcv';
import { leaveOneOut } from './leaveOneOut';
import type { ResamplingScheme } from './types';

export type { DrawState, Limit, PowerSumAccess, ResamplingScheme } from './types';
export { bootstrapCounts } from './bootstrap';
export { foldLabels } from './folds';

/** Every scheme by its kind; a kind of ResampleSpec without a scheme is a compile error. */
export const RESAMPLING: { readonly [K in ResampleSpec['kind']]: ResamplingScheme<Extract<ResampleSpec, { kind: K }>> } = {
  bootstrap,
  folds,
  'leave-one-out': leaveOneOut,
  gcv,
  bundles,
};

/** The schemes in the order help texts list them. */
export const RESAMPLING_LIST: readonly ResamplingScheme[] = Object.values(RESAMPLING) as ResamplingScheme[];

/** The scheme of a spec. */
export function resamplingScheme<S extends ResampleSpec>(spec: S): ResamplingScheme<S> {
  return RESAMPLING[spec.kind] as unknown as ResamplingScheme<S>;
}

/** Default resampling of the command line and the settings. */
export const DEFAULT_RESAMPLING = 'bootstrap:50';

/**
 * Parses a resampling text: bootstrap:<resamples>, folds:<k>[x<repeats>], leave-one-out, gcv or bundles:<resamples>.
 * Throws InputError naming the accepted forms. Example: parseResampling('folds:10x5').
 */
export function parseResampling(text: string): ResampleSpec {
  const t = text.trim();
  for (const s of RESAMPLING_LIST) {
    const spec = s.parse(t);
    if (spec) return spec;
  }
  throw new InputError(`resampling "${text}" is not understood; use ${RESAMPLING_LIST.map((s) => s.syntax).join(', ')}`);
}

/** The text form of a resampling spec. Example: formatResampling({ kind: 'folds', folds: 10, repeats: 1 }) -> 'folds:10'. */
export function formatResampling(spec: ResampleSpec): string {
  return resamplingScheme(spec).format(spec);
}

/** A resampling spec in words, with its seed where it matters. */
export function resamplingWords(spec: ResampleSpec, seed: number): string {
  return resamplingScheme(spec).words(spec, seed);
}

/** A regular expression for the settings schema that accepts exactly the texts parseResampling accepts (up to the numeric limits). */
export const RESAMPLING_PATTERN = `^(${RESAMPLING_LIST.map((s) => s.pattern).join('|')})$`;
