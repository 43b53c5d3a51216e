import { InputError } from './errors';
import type { Family } from './types';
import type { ResampleSpec, RuleSpec } from './tune/types';

/** Largest number of candidate df accepted in one list or range. */
export const MAX_CANDIDATES = 200;

/** Parses a curve family name: natural | poly | smooth. */
export function parseFamily(text: string): Family {
  if (text === 'natural' || text === 'poly' || text === 'smooth') return text;
  throw new InputError(`unknown curve family "${text}"; use natural, poly or smooth`);
}

/** Parses df candidates: a number (`5`), a list (`3,5,8`) or a range (`2..12`, whole steps). */
export function parseDfList(text: string): number[] {
  const t = text.trim();
  const range = /^(\d+(?:\.\d+)?)\s*\.\.\s*(\d+(?:\.\d+)?)$/.exec(t);
  if (range) {
    const a = Number(range[1]);
    const b = Number(range[2]);
    if (!(b >= a)) throw new InputError(`df range "${text}" must go upwards (e.g. 2..12)`);
    if (b - a + 1 > MAX_CANDIDATES) throw new InputError(`df range "${text}" has more than ${MAX_CANDIDATES} candidates`);
    const out: number[] = [];
    for (let v = a; v <= b + 1e-9; v++) out.push(Number(v.toFixed(6)));
    return out;
  }
  const parts = t.split(',').map((s) => s.trim());
  const out = parts.map((s) => {
    const v = Number(s);
    if (s === '' || !Number.isFinite(v) || v < 1) throw new InputError(`df "${s}" in "${text}" is not a number of at least 1`);
    return v;
  });
  if (out.length > MAX_CANDIDATES) throw new InputError(`more than ${MAX_CANDIDATES} df candidates`);
  return out;
}

/** Parses resampling: `boot:<B>`, `cv:<K>` or `cv:<K>x<R>`, `loo`, `gcv`. */
export function parseResample(text: string): ResampleSpec {
  const t = text.trim();
  if (t === 'loo') return { kind: 'loo' };
  if (t === 'gcv') return { kind: 'gcv' };
  const boot = /^boot:(\d+)$/.exec(t);
  if (boot) return { kind: 'boot', resamples: Number(boot[1]) };
  const cv = /^cv:(\d+)(?:x(\d+))?$/.exec(t);
  if (cv) return { kind: 'cv', folds: Number(cv[1]), repeats: cv[2] !== undefined ? Number(cv[2]) : 1 };
  throw new InputError(`resampling "${text}" is not understood; use boot:<B>, cv:<K>, cv:<K>x<R>, loo or gcv`);
}

/** Formats a resampling spec back into its text form. */
export function formatResample(spec: ResampleSpec): string {
  switch (spec.kind) {
    case 'boot':
      return `boot:${spec.resamples}`;
    case 'cv':
      return spec.repeats > 1 ? `cv:${spec.folds}x${spec.repeats}` : `cv:${spec.folds}`;
    default:
      return spec.kind;
  }
}

/** Parses a rule: `lowest`, `1se`, `tol:<percent>`, or `df:<k>` (a df chosen by the person). */
export function parseRule(text: string): RuleSpec {
  const t = text.trim();
  if (t === 'lowest') return { kind: 'lowest' };
  if (t === '1se') return { kind: '1se' };
  const tol = /^tol:(\d+(?:\.\d+)?)%?$/.exec(t);
  if (tol) return { kind: 'tol', percent: Number(tol[1]) };
  const manual = /^df:(\d+(?:\.\d+)?)$/.exec(t);
  if (manual) return { kind: 'manual', df: Number(manual[1]) };
  throw new InputError(`rule "${text}" is not understood; use lowest, 1se, tol:<percent> (e.g. tol:2) or df:<k>`);
}

/** Parses a seed: a whole number. */
export function parseSeed(text: string): number {
  const v = Number(text);
  if (!Number.isSafeInteger(v)) throw new InputError(`seed "${text}" is not a whole number`);
  return v;
}
