/**
 * How the core refers to an option in a message: by a key that each front end renders in
 * its own words (the command line's flag, or the editor's setting), so an editor message
 * never quotes a command-line flag and a terminal message never quotes a setting.
 */

/** Every option a core message may name, with its flag and its setting. */
export const OPTION_NAMES = {
  extrapolate: { cli: '--extrapolate', setting: 'knotwise.table.extrapolate' },
  digits: { cli: '--digits', setting: 'knotwise.table.significantDigits' },
  grid: { cli: '--grid', setting: 'knotwise.table.grid' },
  curve: { cli: '--curve', setting: 'knotwise.curve' },
  outcome: { cli: '--outcome', setting: 'knotwise.outcome' },
  shape: { cli: '--shape', setting: 'knotwise.shape' },
  robust: { cli: '--robust', setting: 'knotwise.robust' },
  resampling: { cli: '--resampling', setting: 'knotwise.resampling' },
  rule: { cli: '--rule', setting: 'knotwise.rule' },
  holdout: { cli: '--holdout', setting: 'knotwise.holdoutFraction' },
  candidates: { cli: '--df', setting: 'knotwise.candidates' },
  flagNegative: { cli: '--flag-negative', setting: 'knotwise.table.flagNegative' },
} as const;

export type OptionKey = keyof typeof OPTION_NAMES;

/** Who reads a message: a terminal user (flags) or an editor user (settings). */
export type Audience = 'cli' | 'editor';

const MARK = /\u27e6(\w+)\u27e7/g;

/** A reference to an option inside a core message. Example: `raise ${opt('digits')}`. */
export function opt(key: OptionKey): string {
  return `\u27e6${key}\u27e7`;
}

/**
 * A message with its option references in the audience's words.
 * Example: renderOptions(`raise ${opt('digits')}`, 'editor') -> 'raise the setting knotwise.table.significantDigits'.
 */
export function renderOptions(text: string, audience: Audience): string {
  return text.replace(MARK, (m, key: string) => {
    const names = (OPTION_NAMES as Record<string, { cli: string; setting: string }>)[key];
    if (!names) return m;
    return audience === 'cli' ? names.cli : `the setting ${names.setting}`;
  });
}
