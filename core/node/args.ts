/**
 * The command line's option parser: each command declares its options once, in a table
 * (name, value placeholder, help, default, accepted values and limits), and the same table
 * drives parsing, the defaults the command sees and the `--help` text. Nothing is written
 * twice, so help cannot drift from what is accepted.
 *
 * Rules: `--name value` and `--name=value`; an option that takes a value always takes the
 * next argument, even when it starts with `-` (so `--grid -40:85:count=126` works); `--`
 * ends the options; `-` alone is an operand (standard input); `-h` and `--help` ask for the
 * command's help. Anything else starting with `-` is an unknown option, reported with the
 * nearest known option by edit distance. Every problem is an InputError in Knotwise's words.
 */
import { InputError } from '../errors';

/** One accepted value (or form of a value) of an option, with one line of help. */
export interface Choice {
  readonly value: string;
  readonly help?: string | undefined;
}

/** One option of a command. `N` is the option's name. */
export interface OptionSpec<N extends string = string> {
  /** Long name without the dashes: `resampling` is given as `--resampling`. */
  readonly name: N;
  /** Placeholder of the value, e.g. `column`; absent for a switch (an option without a value). */
  readonly value?: string | undefined;
  /** What the option does, in one or two sentences. */
  readonly help: string;
  /** The value used when the option is not given (value options), shown in help. */
  readonly default?: string | undefined;
  /** How help states the default when it is not a value (`next to the data file`); switches default to `off`. */
  readonly defaultText?: string | undefined;
  /** The command refuses to run without it. */
  readonly required?: boolean | undefined;
  /** A required option that another one replaces: not needed when that option (its name) is given. */
  readonly requiredUnless?: N | undefined;
  /** Accepted values or forms, listed under the option in help. */
  readonly choices?: readonly Choice[] | undefined;
  /** Limits in words, e.g. `resamples 2 to 5000`. */
  readonly limits?: string | undefined;
  /** Heading under which help lists the option. */
  readonly group?: string | undefined;
}

/** A command and its options. */
export interface CommandSpec<N extends string = string> {
  readonly name: string;
  /** One line: what the command does. */
  readonly summary: string;
  /** Usage lines, without the leading `knotwise`. */
  readonly usage: readonly string[];
  /** Operands (arguments that are not options): how many, and what help calls them. */
  readonly operands: { readonly min: number; readonly max: number; readonly name: string; readonly missing?: string };
  readonly options: readonly OptionSpec<N>[];
  /** Paragraphs printed after the options. */
  readonly notes?: readonly string[] | undefined;
}

/** Declares a command; keeps the option names as a type, so `args.text('nme')` is a compile error. */
export function defineCommand<const N extends string>(spec: CommandSpec<N>): CommandSpec<N> {
  const seen = new Set<string>();
  for (const o of spec.options) {
    if (seen.has(o.name)) throw new Error(`option --${o.name} of ${spec.name} is declared twice`);
    if (o.name === 'help' || o.name.startsWith('-') || /[\s=]/.test(o.name)) throw new Error(`option name "${o.name}" of ${spec.name} is not allowed`);
    if (o.value === undefined && o.default !== undefined) throw new Error(`switch --${o.name} of ${spec.name} cannot have a default value`);
    seen.add(o.name);
  }
  return spec;
}

/** The options and operands of one command line, with the table's defaults filled in. */
export class ParsedArgs<N extends string> {
  constructor(
    private readonly spec: CommandSpec<N>,
    private readonly values: ReadonlyMap<N, string | true>,
    /** Arguments that are not options, in order. */
    readonly operands: readonly string[],
    /** True when `-h` or `--help` was given: print the help, do nothing else. */
    readonly help: boolean,
  ) {}

  private option(name: N): OptionSpec<N> {
    const o = this.spec.options.find((x) => x.name === name);
    if (!o) throw new Error(`${this.spec.name} has no option --${name}`);
    return o;
  }

  /** True when the option was given on the command line (not just defaulted). */
  given(name: N): boolean {
    this.option(name);
    return this.values.has(name);
  }

  /** The value of a value option: as given, else its default, else undefined. */
  text(name: N): string | undefined {
    const o = this.option(name);
    if (o.value === undefined) throw new Error(`--${name} of ${this.spec.name} is a switch, not a value option`);
    const v = this.values.get(name);
    return typeof v === 'string' ? v : o.default;
  }

  /** Whether a switch was given. */
  flag(name: N): boolean {
    const o = this.option(name);
    if (o.value !== undefined) throw new Error(`--${name} of ${this.spec.name} takes a value, not a switch`);
    return this.values.get(name) === true;
  }
}

/**
 * Edit distance between two words: insertions, deletions, substitutions and swaps of two
 * neighbouring letters each cost 1 (the restricted Damerau-Levenshtein distance, also called
 * optimal string alignment). O(|a| |b|). Example: editDistance('resample', 'resampling') === 3.
 */
export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  // Three rows are enough: the swap looks two rows back.
  let prev2 = new Array<number>(n + 1).fill(0);
  let prev = Array.from({ length: n + 1 }, (_, j) => j);
  let cur = new Array<number>(n + 1).fill(0);
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min((prev[j] as number) + 1, (cur[j - 1] as number) + 1, (prev[j - 1] as number) + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, (prev2[j - 2] as number) + 1);
      cur[j] = d;
    }
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[n] as number;
}

/**
 * The candidate nearest to `word` (case ignored), when it is near enough to be a likely
 * misspelling: at most 1 edit for words of 3 or 4 letters, 2 for longer ones (none for
 * shorter), or both starting alike (at least 4 letters, and all of the shorter word but at
 * most its last letter: `resample`, `resampling`). Ties go to the earlier candidate. Example: nearest('resample', ['rule', 'resampling']) === 'resampling'.
 */
export function nearest(word: string, candidates: readonly string[]): string | undefined {
  const w = word.toLowerCase();
  let best: string | undefined;
  let bestScore = Infinity;
  for (const c of candidates) {
    const lc = c.toLowerCase();
    const d = editDistance(w, lc);
    let common = 0;
    while (common < w.length && w[common] === lc[common]) common++;
    const prefix = common >= 4 && common >= Math.min(w.length, lc.length) - 1;
    const near = d <= (w.length <= 2 ? 0 : w.length <= 4 ? 1 : 2) || prefix;
    if (near && d < bestScore) {
      best = c;
      bestScore = d;
    }
  }
  return best;
}

/** `--name <value>` as help and messages show an option. */
export function optionForm(o: OptionSpec): string {
  return o.value !== undefined ? `--${o.name} <${o.value}>` : `--${o.name}`;
}

/** The message for an unknown option, naming the nearest known one. */
function unknownOption(spec: CommandSpec, token: string): InputError {
  const bare = token.replace(/^-+/, '').split('=')[0] as string;
  const guess = bare
    ? nearest(
        bare,
        spec.options.map((o) => o.name),
      )
    : undefined;
  return new InputError(`unknown option ${token.split('=')[0]} for ${spec.name}; ${guess !== undefined ? `did you mean --${guess}?` : `run knotwise ${spec.name} --help for its options`}`);
}

/**
 * Parses the arguments after the command's name against its table. Help (`-h`, `--help`)
 * wins over every other problem, so `knotwise fit --help` works without a data file.
 * Throws InputError: unknown option (with the nearest valid one), a value missing or given
 * to a switch, an option given twice, too many or too few operands, a required option missing.
 * Example: parseCommand(FIT, ['data.csv', '--grid', '-40:85:count=126']).text('grid') === '-40:85:count=126'.
 */
export function parseCommand<N extends string>(spec: CommandSpec<N>, argv: readonly string[]): ParsedArgs<N> {
  const values = new Map<N, string | true>();
  const operands: string[] = [];
  let problem: InputError | undefined;
  const fail = (e: InputError): void => {
    problem ??= e;
  };
  let help = false;
  for (let i = 0; i < argv.length; i++) {
    const token = argv[i] as string;
    if (token === '--') {
      operands.push(...argv.slice(i + 1));
      break;
    }
    if (token === '-' || !token.startsWith('-')) {
      operands.push(token);
      continue;
    }
    if (token === '-h' || token === '--help') {
      help = true;
      continue;
    }
    if (!token.startsWith('--')) {
      fail(unknownOption(spec, token));
      continue;
    }
    const eq = token.indexOf('=');
    const name = token.slice(2, eq >= 0 ? eq : undefined);
    const o = spec.options.find((x) => x.name === name);
    if (!o) {
      fail(unknownOption(spec, token));
      continue;
    }
    let value: string | true;
    if (o.value === undefined) {
      if (eq >= 0) {
        fail(new InputError(`--${name} is a switch and takes no value; got "${token}"`));
        continue;
      }
      value = true;
    } else if (eq >= 0) {
      value = token.slice(eq + 1);
    } else if (i + 1 < argv.length) {
      // A value option always takes the next argument, even one starting with '-'.
      value = argv[++i] as string;
    } else {
      fail(new InputError(`${optionForm(o)} needs a value`));
      continue;
    }
    const before = values.get(o.name);
    if (before !== undefined) {
      fail(new InputError(o.value === undefined ? `--${name} is given twice` : `--${name} is given twice ("${String(before)}" and "${String(value)}"); give it once`));
      continue;
    }
    values.set(o.name, value);
  }
  if (help) return new ParsedArgs(spec, values, operands, true);
  if (problem) throw problem;
  const { min, max, name } = spec.operands;
  if (operands.length > max) {
    const extra = operands[max] as string;
    throw new InputError(
      max === 0 ? `${spec.name} takes no ${name}; got "${extra}"` : `unexpected argument "${extra}" for ${spec.name}, which takes ${max === 1 ? `one ${name}` : `at most ${max} ${name}s`}`,
    );
  }
  if (operands.length < min) throw new InputError(spec.operands.missing ?? `no ${name} given: knotwise ${spec.usage[0] as string}`);
  const missing = spec.options.filter((o) => o.required && !values.has(o.name) && !(o.requiredUnless !== undefined && values.has(o.requiredUnless)));
  if (missing.length) {
    throw new InputError(
      `${spec.name} needs ${spec.options
        .filter((o) => o.required)
        .map(optionForm)
        .join(' and ')}; missing: ${missing.map((o) => `--${o.name}`).join(', ')}`,
    );
  }
  return new ParsedArgs(spec, values, operands, false);
}

/** Width help text is wrapped to. */
const HELP_WIDTH = 92;
/** Column at which an option's help starts. */
const HELP_INDENT = 30;

/** Wraps `text` to HELP_WIDTH, every line starting with `indent` spaces (the first line's start is the caller's). */
function wrap(text: string, indent: number, first = indent): string[] {
  const words = text.split(/\s+/).filter((w) => w !== '');
  const lines: string[] = [];
  let line = '';
  let room = HELP_WIDTH - first;
  for (const w of words) {
    if (line !== '' && line.length + 1 + w.length > room) {
      lines.push(line);
      line = w;
      room = HELP_WIDTH - indent;
    } else line = line === '' ? w : `${line} ${w}`;
  }
  if (line !== '') lines.push(line);
  return lines.map((l, i) => (i === 0 ? l : ' '.repeat(indent) + l));
}

/** How help states an option's default. */
export function defaultWords(o: OptionSpec): string {
  if (o.required) return o.requiredUnless !== undefined ? `required unless --${o.requiredUnless}` : 'required';
  if (o.default !== undefined) return `default ${o.default}`;
  if (o.defaultText !== undefined) return `default: ${o.defaultText}`;
  return o.value === undefined ? 'default off' : 'default none';
}

/** The help of one option: its form, help, default, limits and accepted values. */
function optionHelp(o: OptionSpec): string[] {
  const form = `  ${optionForm(o)}`;
  const text = `${o.help} (${defaultWords(o)})${o.limits !== undefined ? `. Limits: ${o.limits}` : ''}`;
  const out: string[] = [];
  if (form.length + 2 <= HELP_INDENT) out.push(...wrap(text, HELP_INDENT, HELP_INDENT).map((l, i) => (i === 0 ? form.padEnd(HELP_INDENT) + l : l)));
  else out.push(form, ...wrap(text, HELP_INDENT, HELP_INDENT).map((l, i) => (i === 0 ? ' '.repeat(HELP_INDENT) + l : l)));
  if (o.choices) {
    const inner = HELP_INDENT + 2;
    const width = Math.min(26, Math.max(...o.choices.map((c) => c.value.length)) + 2);
    for (const c of o.choices) {
      const head = ' '.repeat(inner) + c.value;
      if (c.help === undefined) out.push(head);
      else if (c.value.length + 2 <= width) out.push(...wrap(c.help, inner + width, inner + width).map((l, i) => (i === 0 ? head.padEnd(inner + width) + l : l)));
      else out.push(head, ...wrap(c.help, inner + width, inner + width).map((l, i) => (i === 0 ? ' '.repeat(inner + width) + l : l)));
    }
  }
  return out;
}

/** The `--help` text of a command, generated from its table. */
export function formatHelp(spec: CommandSpec): string {
  const lines = [...wrap(`knotwise ${spec.name}: ${spec.summary}`, 2, 0), '', 'Usage:', ...spec.usage.map((u) => `  knotwise ${u}`)];
  const groups = [...new Set(spec.options.map((o) => o.group ?? 'Options'))];
  for (const g of groups) {
    lines.push('', `${g}:`);
    for (const o of spec.options.filter((x) => (x.group ?? 'Options') === g)) lines.push(...optionHelp(o));
  }
  lines.push('', `  -h, --help${' '.repeat(HELP_INDENT - 12)}this help`);
  for (const n of spec.notes ?? []) lines.push('', ...wrap(n, 0, 0));
  return lines.join('\n');
}
