/**
 * The settings schema in package.json and the fit-record JSON Schema say exactly what the
 * registries say (core/registry/): the same values, descriptions and text forms, so a
 * variant added to a registry and forgotten in either schema fails here.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { BUILTIN_CURVES, DEFAULT_CURVE } from '../../../core/registry/curves/index';
import { DEFAULT_OUTCOME, OUTCOME_LIST } from '../../../core/registry/outcomes/index';
import { DEFAULT_RESAMPLING, parseResampling, RESAMPLING_LIST, RESAMPLING_PATTERN } from '../../../core/registry/resampling/index';
import { DEFAULT_RULE, RULE_LIST, RULE_PATTERN } from '../../../core/registry/rules/index';
import { DEFAULTS, LIMITS, readSettings } from '../../../extension/settings';

const REPO = join(__dirname, '..', '..', '..');
type Json = Record<string, any>;
const nls = JSON.parse(readFileSync(join(REPO, 'package.nls.json'), 'utf8')) as Record<string, string>;
/** package.json with its %key% placeholders replaced by package.nls.json's texts (what the editor shows). */
const pkg = JSON.parse(readFileSync(join(REPO, 'package.json'), 'utf8'), (_k, v: unknown) =>
  typeof v === 'string' && /^%[^%]+%$/.test(v) ? (nls[v.slice(1, -1)] ?? assert.fail(`package.nls.json has no ${v}`)) : v,
) as Json;
const schema = JSON.parse(readFileSync(join(REPO, 'schema', 'fit-record.schema.json'), 'utf8')) as Json;
const settings = pkg.contributes.configuration.properties as Json;

describe('registries, package.json and the record schema agree', () => {
  it('knotwise.curve lists every built-in curve kind with its description and default', () => {
    assert.deepEqual(
      settings['knotwise.curve'].enum,
      BUILTIN_CURVES.map((k) => k.id),
    );
    assert.deepEqual(
      settings['knotwise.curve'].enumDescriptions,
      BUILTIN_CURVES.map((k) => k.description),
    );
    assert.equal(settings['knotwise.curve'].default, DEFAULT_CURVE);
    assert.equal(DEFAULTS.kind, DEFAULT_CURVE);
  });

  it('knotwise.outcome lists every outcome with its description and default', () => {
    assert.deepEqual(
      settings['knotwise.outcome'].enum,
      OUTCOME_LIST.map((o) => o.id),
    );
    assert.deepEqual(
      settings['knotwise.outcome'].enumDescriptions,
      OUTCOME_LIST.map((o) => o.description),
    );
    assert.equal(settings['knotwise.outcome'].default, DEFAULT_OUTCOME);
  });

  it('knotwise.rule lists the rules a setting may name, with their descriptions', () => {
    const settable = RULE_LIST.filter((r) => r.setting);
    assert.deepEqual(
      settings['knotwise.rule'].enum,
      settable.map((r) => r.id),
    );
    assert.deepEqual(
      settings['knotwise.rule'].enumDescriptions,
      settable.map((r) => r.description),
    );
    assert.equal(settings['knotwise.rule'].default, DEFAULT_RULE);
  });

  it('knotwise.resampling takes exactly the resampling texts, with the registry limits in its description', () => {
    const s = settings['knotwise.resampling'];
    assert.equal(s.pattern, RESAMPLING_PATTERN);
    assert.equal(s.default, DEFAULT_RESAMPLING);
    for (const scheme of RESAMPLING_LIST) {
      for (const [name, limit] of Object.entries(scheme.limits)) {
        assert.ok(s.markdownDescription.includes(`${limit.min} to ${limit.max}`), `${scheme.id} ${name} limits ${limit.min} to ${limit.max} in the description`);
      }
    }
    // One set of limits: the settings reader refuses what the command line refuses.
    for (const text of ['bootstrap:1', 'bootstrap:5001', 'folds:1', 'folds:101', 'folds:5x101']) {
      assert.throws(() => parseResampling(text), /from|takes/, text);
      const r = readSettings((k) => (k === 'resampling' ? text : undefined));
      assert.ok(
        r.problems.some((p) => p.startsWith('knotwise.resampling')),
        `${text}: ${r.problems.join('; ')}`,
      );
    }
    for (const text of ['bootstrap:2', 'bootstrap:5000', 'folds:2', 'folds:100x100', 'leave-one-out', 'gcv']) {
      assert.deepEqual(readSettings((k) => (k === 'resampling' ? text : undefined)).problems, [], text);
      assert.ok(new RegExp(RESAMPLING_PATTERN).test(text), text);
    }
    assert.equal(settings['knotwise.tolerancePercent'].maximum, LIMITS.tolerancePercent[1]);
  });

  it('the record schema names the same curve kinds, outcomes, resampling texts and rules', () => {
    const spec = schema.properties.spec.properties;
    assert.deepEqual(
      spec.curve.enum,
      BUILTIN_CURVES.map((k) => k.id),
    );
    assert.deepEqual(
      schema.properties.fit.properties.curve.enum,
      BUILTIN_CURVES.map((k) => k.id),
    );
    assert.deepEqual(spec.model.properties.outcome.enum, [...OUTCOME_LIST.map((o) => o.id), null]);
    assert.equal(spec.resampling.pattern, RESAMPLING_PATTERN);
    assert.equal(spec.rule.pattern, RULE_PATTERN);
    assert.equal(schema.properties.version.const, 3);
  });

  it('no setting or record key keeps a replaced name', () => {
    for (const old of ['knotwise.curveFamily', 'knotwise.huberK']) assert.equal(settings[old], undefined, old);
    const text = JSON.stringify(settings);
    for (const old of [
      '"natural"',
      '"poly"',
      '"smooth"',
      '"gaussian"',
      '"poisson"',
      '"binomial"',
      'boot:',
      'cv:',
      '"1se"',
      '"lowest"',
      '"tolerance"',
      '--family',
      '--model ',
      '--huber-k',
      '--nonnegative',
    ]) {
      assert.ok(!text.includes(old), `package.json settings still say ${old}`);
    }
    const s = JSON.stringify(schema);
    for (const old of ['"family"', '"resample"', '"sigma"', '"nonnegative":', 'boot:', '"gaussian"']) assert.ok(!s.includes(old), `the record schema still says ${old}`);
  });
});
