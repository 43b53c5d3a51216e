/**
 * Quoting of one word for a POSIX shell, for the commands Knotwise prints and writes into
 * its outputs (the regenerate command, `knotwise check` lines).
 */

/** Characters a POSIX shell word may hold without quotes. */
const PLAIN_WORD = /^[A-Za-z0-9_./:,=@%+-]+$/;

/** A shell word: as is when plain, else in single quotes (a quote inside becomes '\''). */
export function shellWord(text: string): string {
  return PLAIN_WORD.test(text) ? text : `'${text.replace(/'/g, `'\\''`)}'`;
}
