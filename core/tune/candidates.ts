import { InputError } from '../errors';

/** Largest number of candidate df accepted in one list or range. */
export const MAX_CANDIDATES = 200;

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

/** Parses a seed: a whole number. */
export function parseSeed(text: string): number {
  const v = Number(text);
  if (!Number.isSafeInteger(v)) throw new InputError(`seed "${text}" is not a whole number`);
  return v;
}
