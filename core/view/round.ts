/** Rounds values for the panel message: display precision only, keeps the JSON short. */

/** `v` rounded to `digits` significant digits (non-finite values become null in JSON, so keep them as NaN -> 0 is not allowed: returns NaN). */
export function roundSig(v: number, digits = 7): number {
  if (!Number.isFinite(v) || v === 0) return v;
  return Number(v.toPrecision(digits));
}

/** A plain number array of `a`, each value rounded to `digits` significant digits. */
export function roundAll(a: ArrayLike<number>, digits = 7): number[] {
  const out = new Array<number>(a.length);
  for (let i = 0; i < a.length; i++) out[i] = roundSig(a[i] as number, digits);
  return out;
}
