/**
 * Tests of the command line's option parser (core/node/args.ts): values that start with
 * '-' (negative grid bounds) in both `--opt value` and `--opt=value` form, defaults from the
 * table, `--` and `-`, every malformed command line refused in Knotwise's words, and the
 * nearest-option suggestion. Edit distances are checked against the worked examples of the
 * Wikipedia articles "Levenshtein distance" (kitten/sitting: 3) and "Damerau–Levenshtein
 * distance" (CA/ABC: 3 for the restricted form, optimal string alignment, 2 without the
 * restriction).
 */
import { strict as assert } from 'node:assert';
import { defineCommand, editDistance, formatHelp, nearest, parseCommand } from '../../../core/node/args';
import { commands } from '../../../core/node/cli';
import { InputError } from '../../../core/errors';
import { DEFAULT_RESAMPLING } from '../../../core/registry/resampling/index';

/** The real `fit` table. */
function fit() {
  const spec = commands().find((c) => c.name === 'fit');
  assert.ok(spec);
  return spec;
}

/** Asserts that parsing throws an InputError whose message matches `pattern` (and is not the runtime's own text). */
function refused(argv: string[], pattern: RegExp): void {
  assert.throws(
    () => parseCommand(fit(), argv),
    (e: unknown) => {
      assert.ok(e instanceof InputError, `an InputError, got ${String(e)}`);
      assert.match(e.message, pattern);
      assert.doesNotMatch(e.message, /ERR_PARSE_ARGS|positional|Unknown option '/);
      return true;
    },
  );
}

describe('option parser (core/node/args.ts)', () => {
  describe('editDistance and nearest', () => {
    it('matches the textbook examples: kitten/sitting 3, CA/ABC 3 (optimal string alignment), a swap of neighbours 1', () => {
      assert.equal(editDistance('kitten', 'sitting'), 3);
      assert.equal(editDistance('sitting', 'kitten'), 3);
      assert.equal(editDistance('CA', 'ABC'), 3);
      assert.equal(editDistance('ca', 'ac'), 1);
      assert.equal(editDistance('', 'abc'), 3);
      assert.equal(editDistance('rule', 'rule'), 0);
      assert.equal(editDistance('resample', 'resampling'), 3);
    });

    it('suggests the nearest option name, or none when nothing is near', () => {
      const names = fit().options.map((o) => o.name);
      assert.equal(nearest('resample', names), 'resampling');
      assert.equal(nearest('outcomes', names), 'outcome');
      assert.equal(nearest('robus-k', names), 'robust-k');
      assert.equal(nearest('wieghts', names), 'weights');
      assert.equal(nearest('print', names), 'print-only');
      assert.equal(nearest('flag-negatve', names), 'flag-negative');
      assert.equal(nearest('JSON', names), 'json');
      assert.equal(nearest('colour', names), undefined);
      assert.equal(nearest('family', names), undefined);
    });
  });

  describe('parseCommand', () => {
    it('a value option takes the next argument even when it starts with "-", and --opt=value works the same', () => {
      const a = parseCommand(fit(), ['t.csv', '--x', 'a', '--y', 'b', '--grid', '-40:85:count=126']);
      assert.equal(a.text('grid'), '-40:85:count=126');
      const b = parseCommand(fit(), ['t.csv', '--x=a', '--y=b', '--grid=-40:85:count=126']);
      assert.equal(b.text('grid'), '-40:85:count=126');
      assert.equal(b.text('x'), 'a');
      // A column whose name starts with '-', and a value holding '='.
      const c = parseCommand(fit(), ['t.csv', '--x', '-T-', '--y', 'b=c']);
      assert.equal(c.text('x'), '-T-');
      assert.equal(c.text('y'), 'b=c');
      assert.deepEqual(c.operands, ['t.csv']);
    });

    it('fills defaults from the table and tells given options from defaulted ones', () => {
      const a = parseCommand(fit(), ['t.csv', '--x', 'a', '--y', 'b', '--robust']);
      assert.equal(a.text('resampling'), DEFAULT_RESAMPLING);
      assert.equal(a.given('resampling'), false);
      assert.equal(a.text('weights'), undefined);
      assert.equal(a.flag('robust'), true);
      assert.equal(a.flag('json'), false);
    });

    it('"-" is an operand (standard input); "--" ends the options', () => {
      assert.deepEqual(parseCommand(fit(), ['-', '--x', 'a', '--y', 'b']).operands, ['-']);
      assert.deepEqual(parseCommand(fit(), ['--x', 'a', '--y', 'b', '--', '--odd-name.csv']).operands, ['--odd-name.csv']);
    });

    it('help wins over every other problem', () => {
      assert.equal(parseCommand(fit(), ['--help']).help, true);
      assert.equal(parseCommand(fit(), ['--colour', '-h']).help, true);
    });

    it('refuses unknown, malformed, repeated and missing options in its own words', () => {
      refused(['t.csv', '--x', 'a', '--y', 'b', '--resample', 'bootstrap:20'], /^unknown option --resample for fit; did you mean --resampling\?$/);
      refused(['t.csv', '--x', 'a', '--y', 'b', '--resample=bootstrap:20'], /^unknown option --resample for fit; did you mean --resampling\?$/);
      refused(['t.csv', '--x', 'a', '--y', 'b', '--colour'], /^unknown option --colour for fit; run knotwise fit --help for its options$/);
      refused(['t.csv', '-x', 'a', '--y', 'b'], /^unknown option -x for fit; did you mean --x\?$/);
      refused(['t.csv', '--x', 'a', '--y'], /^--y <column> needs a value$/);
      refused(['t.csv', '--x', 'a', '--y', 'b', '--robust=yes'], /^--robust is a switch and takes no value; got "--robust=yes"$/);
      refused(['t.csv', '--x', 'a', '--x', 'c', '--y', 'b'], /^--x is given twice \("a" and "c"\); give it once$/);
      refused(['t.csv', 'u.csv', '--x', 'a', '--y', 'b'], /^unexpected argument "u\.csv" for fit, which takes one data file$/);
      refused(['--x', 'a', '--y', 'b'], /^no data file given/);
      refused(['t.csv', '--y', 'b'], /^fit needs --x <column> and --y <column>; missing: --x$/);
    });
  });

  describe('defineCommand and formatHelp', () => {
    it('refuses a table that declares an option twice or gives a switch a default', () => {
      const base = { name: 't', summary: 's', usage: ['t'], operands: { min: 0, max: 0, name: 'argument' } };
      assert.throws(
        () =>
          defineCommand({
            ...base,
            options: [
              { name: 'a', help: 'h' },
              { name: 'a', help: 'h' },
            ],
          }),
        /declared twice/,
      );
      assert.throws(() => defineCommand({ ...base, options: [{ name: 'a', help: 'h', default: 'x' }] }), /cannot have a default/);
    });

    it('wraps help to 92 columns and lists choices under their option', () => {
      const spec = defineCommand({
        name: 't',
        summary: 'a test command',
        usage: ['t [options]'],
        operands: { min: 0, max: 0, name: 'argument' },
        options: [
          {
            name: 'mode',
            value: 'm',
            help: 'how it runs '.repeat(20).trim(),
            default: 'fast',
            choices: [
              { value: 'fast', help: 'quick' },
              { value: 'careful', help: 'slow '.repeat(30).trim() },
            ],
          },
        ],
      });
      const text = formatHelp(spec);
      for (const line of text.split('\n')) assert.ok(line.length <= 92, `"${line}" is ${line.length} characters`);
      assert.match(text, /^ {2}--mode <m> {2,}how it runs/m);
      assert.match(text, /\(default fast\)/);
      assert.match(text, /^ {32}fast {2,}quick$/m);
    });
  });
});
