/**
 * Tests of the message guards (core/protocol.ts) with hostile input: every well-formed
 * message passes, also after the JSON round trip and the structured clone a webview
 * message goes through; then each message is broken one way at a time (wrong tag, a
 * field missing, a field of the wrong type, NaN or Infinity where a finite number is
 * needed, ids that are not whole numbers, extra keys, huge strings, `__proto__` and
 * `constructor` keys, inherited fields, nesting too deep) and must be refused. The payload
 * and detail come from a real analysis of datasets::cars (Ezekiel 1930; fits.json), the
 * overview of a grouped run from datasets::CO2 (Potvin, Lechowicz & Tardif 1990;
 * test/e2e/fixtures/co2.csv).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../core/analysis/analysis';
import {
  FOLD_IDS,
  isHostMessage,
  isModelChoice,
  isPanelMessage,
  isPanelState,
  isRuleSpec,
  MAX_GROUPS,
  MAX_MESSAGE_TEXT,
  MAX_SAVED_FILES,
  type HostMessage,
  type PanelMessage,
} from '../../core/protocol';
import { analyseGroups } from '../../core/groups/analyse';
import { splitByColumn } from '../../core/groups/split';
import { parseCsvText } from '../../core/ingest/reader';
import { buildGroupsView, type GroupsView } from '../../core/view/groups';
import { OUTCOME_LIST } from '../../core/registry/outcomes/index';
import { RULE_LIST } from '../../core/registry/rules/index';
import type { DataStateView, FitDetail, PanelPayload, RefitView } from '../../core/view/model';
import { buildPanelPayload } from '../../core/view/payload';

const CARS = (JSON.parse(readFileSync(join(__dirname, '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;

/** A value of every JSON-ish type but the one a field wants, plus the non-finite numbers. */
const WRONG_FOR_NUMBER: readonly unknown[] = [NaN, Infinity, -Infinity, '1', null, undefined, true, {}, [], [1], { valueOf: () => 1 }];
const WRONG_FOR_TEXT: readonly unknown[] = [1, null, undefined, true, {}, ['a'], 'x'.repeat(MAX_MESSAGE_TEXT + 1)];
const HUGE = 'x'.repeat(5_000_000);

/** A copy of `o` with `key` set to `value` (or removed when `value` is the string 'missing'). */
function withField(o: object, key: string, value: unknown): Record<string, unknown> {
  const copy: Record<string, unknown> = { ...(o as Record<string, unknown>) };
  if (value === 'missing') delete copy[key];
  else copy[key] = value;
  return copy;
}

/** `o` through JSON text with an own "__proto__" key added (JSON.parse keeps it as an own key, as a structured clone does). */
function withProtoKey(o: object): unknown {
  const text = JSON.stringify(o);
  return JSON.parse(`{"__proto__":{"polluted":true},${text.slice(1)}`);
}

/** `o` after the structured clone a webview message goes through. */
const cloned = <T>(o: T): T => structuredClone(o);

const PANEL_MESSAGES: readonly PanelMessage[] = [
  { type: 'ready' },
  { type: 'rerun' },
  { type: 'needDetail', runId: 3, df: 6 },
  { type: 'needDetail', runId: 0, df: 4.5 },
  { type: 'choice', runId: 3, rule: { kind: 'one-se' }, df: 5 },
  { type: 'choice', runId: 3, rule: { kind: 'pick', df: 7 }, df: 7 },
  { type: 'save', requestId: 1, runId: 3, rule: { kind: 'simplest-within', percent: 2.5 } },
  { type: 'save', requestId: 2, runId: 3, rule: { kind: 'least-error' } },
  { type: 'revealLine', line: 134 },
  { type: 'model', runId: 3, model: { outcome: 'counts', shape: ['increasing', 'concave'], robust: false } },
  { type: 'model', runId: 3, model: { outcome: 'continuous', shape: [], robust: true } },
  { type: 'refitAndSave', requestId: 4, runId: 3, rule: { kind: 'pick', df: 5 } },
  { type: 'stop' },
  { type: 'candidates', runId: 3, candidates: '2..20' },
  { type: 'candidates', runId: 3, candidates: '3, 5, 8' },
  { type: 'selectGroup', setId: 3, group: 0 },
  { type: 'selectGroup', setId: 3, group: 11 },
];

/** The fields of each panel message that must be whole numbers >= 0 (ids) or finite numbers > 0 (df). */
const NUMBER_FIELDS = ['runId', 'requestId', 'df', 'line', 'setId', 'group'];

describe('isPanelMessage', () => {
  it('accepts every well-formed message, also after a JSON round trip and a structured clone', () => {
    for (const m of PANEL_MESSAGES) {
      assert.equal(isPanelMessage(m), true, JSON.stringify(m));
      assert.equal(isPanelMessage(JSON.parse(JSON.stringify(m))), true, `JSON ${JSON.stringify(m)}`);
      assert.equal(isPanelMessage(cloned(m)), true, `clone ${JSON.stringify(m)}`);
    }
    // A message built without a prototype (as some serialisers do) is plain data too.
    assert.equal(isPanelMessage(Object.assign(Object.create(null) as object, { type: 'revealLine', line: 2 })), true);
  });

  it('refuses wrong tags and non-objects', () => {
    for (const m of [
      undefined,
      null,
      0,
      'ready',
      ['ready'],
      [{ type: 'ready' }],
      { type: 'READY' },
      { type: 'ready ' },
      { type: 'result' },
      { type: HUGE },
      { type: 1 },
      {},
      () => ({ type: 'ready' }),
    ]) {
      assert.equal(isPanelMessage(m), false, String(typeof m === 'string' ? m.slice(0, 20) : JSON.stringify(m)));
    }
  });

  it('refuses each message with any one field missing', () => {
    for (const m of PANEL_MESSAGES) {
      for (const key of Object.keys(m)) assert.equal(isPanelMessage(withField(m, key, 'missing')), false, `${m.type} without ${key}`);
    }
  });

  it('refuses NaN, Infinity, strings, null and objects where a number is needed, and ids that are not whole numbers', () => {
    for (const m of PANEL_MESSAGES) {
      for (const key of Object.keys(m).filter((k) => NUMBER_FIELDS.includes(k))) {
        for (const bad of WRONG_FOR_NUMBER) assert.equal(isPanelMessage(withField(m, key, bad)), false, `${m.type}.${key} = ${String(bad)}`);
        assert.equal(isPanelMessage(withField(m, key, -1)), false, `${m.type}.${key} = -1`);
        if (key === 'df') continue;
        assert.equal(isPanelMessage(withField(m, key, 1.5)), false, `${m.type}.${key} = 1.5`);
        assert.equal(isPanelMessage(withField(m, key, 2 ** 53)), false, `${m.type}.${key} = 2^53 (not a safe integer)`);
      }
    }
    assert.equal(isPanelMessage({ type: 'revealLine', line: 0 }), false, 'CSV lines start at 1');
    assert.equal(isPanelMessage({ type: 'needDetail', runId: 1, df: 0 }), false, 'a df is positive');
    assert.equal(isPanelMessage({ type: 'selectGroup', setId: 1, group: MAX_GROUPS }), false, 'no group beyond the most a run may have');
  });

  it('refuses extra keys, huge strings among them, and prototype keys at any level', () => {
    for (const m of PANEL_MESSAGES) {
      assert.equal(isPanelMessage(withField(m, 'extra', HUGE)), false, `${m.type} with a huge extra string`);
      assert.equal(isPanelMessage(withField(m, 'constructor', {})), false, `${m.type} with a constructor key`);
      assert.equal(isPanelMessage(withProtoKey(m)), false, `${m.type} with a __proto__ key`);
    }
    assert.equal(isPanelMessage(JSON.parse('{"type":"save","requestId":1,"runId":1,"rule":{"kind":"one-se","__proto__":{"x":1}}}')), false, 'nested in the rule');
    assert.equal(isPanelMessage(JSON.parse('{"type":"model","runId":1,"model":{"outcome":"counts","shape":[],"robust":false,"__proto__":{"x":1}}}')), false, 'nested in the model');
    assert.equal(({} as Record<string, unknown>).polluted, undefined, 'checking polluted nothing');
  });

  it("refuses candidates the command line's --df would refuse", () => {
    for (const bad of ['', ' ', '20..2', '2..500', '0', '-3', 'a..b', '2..20; rm', '1e999', 'NaN', 7, null, ['2..20'], { from: 2, to: 20 }, `2,${'3,'.repeat(2000)}4`]) {
      assert.equal(isPanelMessage({ type: 'candidates', runId: 3, candidates: bad }), false, JSON.stringify(bad).slice(0, 40));
    }
    assert.equal(isPanelMessage({ type: 'candidates', runId: 3, candidates: '2..20', rule: { kind: 'one-se' } }), false, 'an extra key');
  });

  it('refuses inherited fields, class instances and symbol keys', () => {
    assert.equal(isPanelMessage(Object.create({ type: 'ready' }) as object), false, 'type only on the prototype');
    class Ready {
      readonly type = 'ready';
    }
    assert.equal(isPanelMessage(new Ready()), false);
    assert.equal(isPanelMessage({ type: 'ready', [Symbol('s')]: 1 }), false);
    assert.equal(isPanelMessage(new Map([['type', 'ready']])), false);
  });
});

describe('isRuleSpec', () => {
  it('accepts every rule of the registry in each form parseRule gives', () => {
    const samples = { 'one-se': { kind: 'one-se' }, 'least-error': { kind: 'least-error' }, 'simplest-within': { kind: 'simplest-within', percent: 0 }, pick: { kind: 'pick', df: 3 } };
    for (const r of RULE_LIST) {
      assert.equal(isRuleSpec(samples[r.id]), true, r.id);
      assert.equal(isRuleSpec(r.parse(r.id === 'simplest-within' ? 'simplest-within:100' : r.id === 'pick' ? 'pick:4.5' : r.id)), true, `${r.id} parsed`);
    }
  });

  it('refuses unknown kinds, missing or wrong numbers, tolerances outside 0-100 % and extra keys', () => {
    for (const r of [
      { kind: 'lowest' },
      { kind: '1se' },
      { kind: 'simplest-within' },
      { kind: 'simplest-within', percent: -1 },
      { kind: 'simplest-within', percent: 100.5 },
      { kind: 'simplest-within', percent: NaN },
      { kind: 'simplest-within', percent: Infinity },
      { kind: 'simplest-within', percent: '2' },
      { kind: 'pick' },
      { kind: 'pick', df: 0 },
      { kind: 'pick', df: -3 },
      { kind: 'pick', df: Infinity },
      { kind: 'pick', df: NaN },
      { kind: 'one-se', percent: 2 },
      { kind: 'least-error', note: HUGE },
      { kind: 'pick', df: 3, extra: null },
      JSON.parse('{"kind":"one-se","__proto__":{"x":1}}'),
      Object.create({ kind: 'one-se' }) as object,
      'one-se',
      null,
      [],
    ]) {
      assert.equal(isRuleSpec(r), false, JSON.stringify(r));
    }
  });
});

describe('isModelChoice', () => {
  it('accepts each outcome of the registry with distinct known shapes', () => {
    for (const o of OUTCOME_LIST) assert.equal(isModelChoice({ outcome: o.id, shape: ['nonnegative', 'convex'], robust: false }), true, o.id);
    assert.equal(
      isModelChoice({ outcome: 'continuous', shape: ['increasing', 'decreasing', 'nonnegative', 'convex', 'concave'], robust: true }),
      true,
      'every shape name (the host checks the combination)',
    );
  });

  it('refuses unknown outcomes and shapes, repeated shapes, wrong types and extra keys', () => {
    for (const m of [
      { outcome: 'gaussian', shape: [], robust: false },
      { outcome: 'Continuous', shape: [], robust: false },
      { outcome: 'continuous', shape: ['wiggly'], robust: false },
      { outcome: 'continuous', shape: ['increasing', 'increasing'], robust: false },
      { outcome: 'continuous', shape: Array<string>(1000).fill('convex'), robust: false },
      { outcome: 'continuous', shape: 'increasing', robust: false },
      { outcome: 'continuous', shape: [1], robust: false },
      { outcome: 'continuous', shape: [], robust: 'yes' },
      { outcome: 'continuous', shape: [], robust: 1 },
      { outcome: 'continuous', shape: [] },
      { shape: [], robust: false },
      { outcome: 'continuous', shape: [], robust: false, k: 1.345 },
      { outcome: HUGE, shape: [], robust: false },
      JSON.parse('{"outcome":"continuous","shape":[],"robust":false,"constructor":{}}'),
      null,
    ]) {
      assert.equal(isModelChoice(m), false, JSON.stringify(m)?.slice(0, 120));
    }
  });
});

/** What moved in a refit, as the host sends it inside a payload. */
const REFIT: RefitView = { reason: 'saved', rowsBefore: 50, rowsNow: 52, dfBefore: 4, dfNow: 5, ruleDropped: false, largestChange: 1.5, atX: 12, ySpread: 118 };

describe('isHostMessage', () => {
  let payload: PanelPayload;
  let detail: FitDetail;
  let view: GroupsView;
  let messages: HostMessage[];

  before(async () => {
    const co2 = parseCsvText(readFileSync(join(__dirname, '..', 'e2e', 'fixtures', 'co2.csv'), 'utf8'), { file: 'co2.csv', keepText: 'plant' });
    const split = splitByColumn(co2, { x: 'conc', y: 'uptake' }, 'plant', 'co2.csv');
    const grouped = await analyseGroups(split.groups, { kind: 'natural-spline', candidates: [2, 3], resample: { kind: 'folds', folds: 7, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }, true);
    view = buildGroupsView({ setId: 4, fileName: 'co2.csv', split, analysis: grouped, common: { words: 'The 12 plants need separate curves.' } });
    const data = { x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y), lines: Int32Array.from(CARS.x, (_, i) => i + 2) };
    const analysis = await analyse(data, { kind: 'natural-spline', candidates: [2, 3, 4, 5], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    payload = buildPanelPayload({ runId: 4, analysis, source: { fileName: 'cars.csv', xLabel: 'speed', yLabel: 'dist' }, rejected: 0, heldOut: 0, tolerancePercent: 2 });
    detail = payload.details[0] as FitDetail;
    messages = [
      { type: 'running', runId: 4, message: 'Tuning 50 rows…' },
      { type: 'result', payload },
      { type: 'failed', runId: 4, message: 'Knotwise could not tune cars.csv: too few rows' },
      { type: 'detail', runId: 4, detail },
      { type: 'saved', requestId: 1, files: ['cars.curve.csv', 'cars.fit.json'] },
      { type: 'saved', requestId: 1, files: ['cars.curve.csv'], note: 'The table has 41 rows.' },
      { type: 'saveFailed', requestId: 2, message: 'Nothing was saved.' },
      { type: 'file', uri: 'file:///data/cars.csv', fileName: 'cars.csv' },
      { type: 'running', runId: 4, message: 'Resampling…', fraction: 0.25 },
      { type: 'dataState', runId: 4, state: { analysed: 'disk', refit: 'automatic', followedOnDisk: false } },
      { type: 'dataState', runId: 4, state: { analysed: 'unsaved', change: { where: 'editor', added: 2, removed: 0, changed: 1, header: false }, refit: 'asked', followedOnDisk: true } },
      { type: 'result', payload: { ...payload, refit: REFIT } },
      { type: 'groups', view },
      { type: 'groupResult', setId: 4, group: 3, payload },
    ];
  });

  it('accepts what the host sends, before and after the JSON round trip and a structured clone (GCV standard errors are NaN, then null)', () => {
    assert.ok(
      payload.candidates.some((c) => Number.isNaN(c.errors.gcv?.se)),
      'precondition: GCV leaves NaN standard errors in the payload',
    );
    for (const m of messages) {
      assert.equal(isHostMessage(m), true, m.type);
      assert.equal(isHostMessage(JSON.parse(JSON.stringify(m))), true, `JSON ${m.type}`);
      assert.equal(isHostMessage(cloned(m)), true, `clone ${m.type}`);
    }
    assert.equal(isHostMessage({ type: 'saved', requestId: 1, files: [], note: undefined }), true, 'an absent note may be undefined');
  });

  it('refuses wrong tags, any one field missing, and extra keys', () => {
    for (const m of [{ type: 'payload', payload: {} }, { type: 'ready' }, { type: 'Result', payload: {} }, 'result', null, []]) assert.equal(isHostMessage(m), false, JSON.stringify(m));
    for (const m of messages) {
      for (const key of Object.keys(m)) {
        if (key === 'note' || key === 'fraction') continue;
        assert.equal(isHostMessage(withField(m, key, 'missing')), false, `${m.type} without ${key}`);
      }
      assert.equal(isHostMessage(withField(m, 'extra', HUGE)), false, `${m.type} with a huge extra string`);
      assert.equal(isHostMessage(withProtoKey(m)), false, `${m.type} with a __proto__ key`);
    }
  });

  it('refuses NaN, Infinity and other non-ids as run and request ids, and non-texts or huge texts as messages', () => {
    for (const m of messages) {
      for (const key of Object.keys(m)) {
        const wrong =
          key === 'runId' || key === 'requestId' || key === 'setId' || key === 'group'
            ? [...WRONG_FOR_NUMBER, -1, 0.5]
            : key === 'message' || key === 'note'
              ? WRONG_FOR_TEXT.filter((v) => !(key === 'note' && v === undefined))
              : [];
        for (const bad of wrong) assert.equal(isHostMessage(withField(m, key, bad)), false, `${m.type}.${key} = ${String(bad).slice(0, 20)}`);
      }
    }
    assert.equal(isHostMessage({ type: 'saved', requestId: 1, files: ['a', HUGE.slice(0, MAX_MESSAGE_TEXT + 1)] }), false, 'a huge file name');
    assert.equal(isHostMessage({ type: 'saved', requestId: 1, files: Array<string>(MAX_SAVED_FILES + 1).fill('a.csv') }), false, 'too many files');
    assert.equal(isHostMessage({ type: 'saved', requestId: 1, files: [1] }), false, 'a number as a file name');
  });

  it('refuses a payload or detail with a wrong field, a prototype key deep inside, a huge string or nesting too deep', () => {
    const result = (p: unknown): unknown => ({ type: 'result', payload: p });
    const broken: [string, unknown][] = [
      ['runId NaN', result({ ...payload, runId: NaN })],
      ['runId Infinity', result({ ...payload, runId: Infinity })],
      ['runId a string', result({ ...payload, runId: '4' })],
      ['no source', result(withField(payload, 'source', 'missing'))],
      ['a number as the x label', result({ ...payload, source: { ...payload.source, xLabel: 7 } })],
      ['a huge file name', result({ ...payload, source: { ...payload.source, fileName: HUGE } })],
      ['rows.used negative', result({ ...payload, rows: { ...payload.rows, used: -1 } })],
      ['candidates not an array', result({ ...payload, candidates: {} })],
      ['an unknown rule', result({ ...payload, rule: { kind: 'lowest' } })],
      ['data of no known kind', result({ ...payload, data: { ...payload.data, kind: 'html' } })],
      ['tolerance Infinity', result({ ...payload, tolerancePercent: Infinity })],
      ['a __proto__ key in a candidate', result(JSON.parse(JSON.stringify(payload).replace('"candidates":[{', '"candidates":[{"__proto__":{"polluted":true},')))],
      ['a constructor key in the source', result({ ...payload, source: { ...payload.source, constructor: { prototype: {} } } })],
      ['nesting 100 deep', result({ ...payload, notes: JSON.parse('['.repeat(100) + ']'.repeat(100)) as unknown })],
      ['a function inside', result({ ...payload, warnings: [() => 'x'] })],
      ['a Map inside', result({ ...payload, model: { ...payload.model, supports: new Map() } })],
      ['detail df Infinity', { type: 'detail', runId: 4, detail: { ...detail, df: Infinity } }],
      ['detail df NaN', { type: 'detail', runId: 4, detail: { ...detail, df: NaN } }],
      ['detail of no residual kind', { type: 'detail', runId: 4, detail: { ...detail, residualKind: 'raw' } }],
      ['detail checks not an array', { type: 'detail', runId: 4, detail: { ...detail, checks: 'none' } }],
      ['a __proto__ key deep in a detail', { type: 'detail', runId: 4, detail: JSON.parse(JSON.stringify(detail).replace('"qq":{', '"qq":{"__proto__":{"polluted":true},')) }],
      ['a huge warning in a detail', { type: 'detail', runId: 4, detail: { ...detail, warnings: [HUGE] } }],
    ];
    for (const [what, m] of broken) assert.equal(isHostMessage(m), false, what);
    assert.equal(({} as Record<string, unknown>).polluted, undefined, 'checking polluted nothing');
  });

  it("refuses a grouped run's overview with a wrong field, no groups or too many, a broken group, a prototype key inside, or a group index out of range", () => {
    assert.ok(view.shared && view.groups.length === 12, 'precondition: 12 plants with a shared df');
    const g0 = view.groups[0] as GroupsView['groups'][number];
    const groups = (v: unknown): unknown => ({ type: 'groups', view: v });
    const withGroup = (g: unknown): unknown => groups({ ...view, groups: [g, ...view.groups.slice(1)] });
    const broken: [string, unknown][] = [
      ['no groups', groups({ ...view, groups: [] })],
      ['too many groups', groups({ ...view, groups: Array<unknown>(MAX_GROUPS + 1).fill(g0) })],
      ['groups not an array', groups({ ...view, groups: { 0: g0 } })],
      ['setId NaN', groups({ ...view, setId: NaN })],
      ['a huge group label', groups({ ...view, groupLabel: HUGE })],
      ['a number as the x label', groups({ ...view, xLabel: 3 })],
      ['rejected negative', groups({ ...view, rejected: -1 })],
      ['an extra key in the view', groups({ ...view, html: '<b>' })],
      ['a view without its file', groups(withField(view, 'fileName', 'missing'))],
      ['common words that are a number', groups({ ...view, common: 5 })],
      ['a shared df of 0', groups({ ...view, shared: { df: 0, reason: 'x' } })],
      ['a shared df with an extra key', groups({ ...view, shared: { df: 3, reason: 'x', html: 1 } })],
      ['a group name that is a number', withGroup({ ...g0, name: 7 })],
      ['an empty group name', withGroup({ ...g0, name: '' })],
      ['a huge group name', withGroup({ ...g0, name: HUGE })],
      ['a group df of 0', withGroup({ ...g0, df: 0 })],
      ['a group range upside down', withGroup({ ...g0, lo: g0.hi + 1 })],
      ['a group range NaN', withGroup({ ...g0, lo: NaN })],
      ['rows negative', withGroup({ ...g0, rows: -1 })],
      ['a curve of texts', withGroup({ ...g0, curve: ['1'] })],
      ['readings of unequal length', withGroup({ ...g0, x: [1, 2], y: [1] })],
      ['an extra key in a group', withGroup({ ...g0, onclick: 'x' })],
      ['a group without its curve', withGroup(withField(g0, 'curve', 'missing'))],
      ['a __proto__ key in a group', groups(JSON.parse(JSON.stringify(view).replace('"groups":[{', '"groups":[{"__proto__":{"polluted":true},')))],
      ['a __proto__ key in the view', groups(JSON.parse(`{"__proto__":{"polluted":true},${JSON.stringify(view).slice(1)}`))],
      ['a group index beyond the most a run may have', { type: 'groupResult', setId: 4, group: MAX_GROUPS, payload }],
      ['a group result with a broken payload', { type: 'groupResult', setId: 4, group: 0, payload: { ...payload, runId: NaN } }],
      ['a group result without its set', { type: 'groupResult', group: 0, payload }],
    ];
    for (const [what, m] of broken) assert.equal(isHostMessage(m), false, what);
    // A group whose fit has no residual SD (NaN, null after a JSON round trip) is still a group.
    assert.equal(isHostMessage(groups({ ...view, groups: [{ ...g0, sigma: NaN }] })), true);
    assert.equal(isHostMessage(JSON.parse(JSON.stringify(groups({ ...view, groups: [{ ...g0, sigma: NaN }] })))), true);
    assert.equal(({} as Record<string, unknown>).polluted, undefined, 'checking polluted nothing');
  });

  it('refuses progress outside 0 to 1, broken data states, broken refit views and URIs too long', () => {
    const fresh: DataStateView = { analysed: 'disk', refit: 'automatic', followedOnDisk: false };
    const change = { where: 'disk', added: 1, removed: 0, changed: 2, header: false };
    const state = (s: unknown): unknown => ({ type: 'dataState', runId: 4, state: s });
    const broken: [string, unknown][] = [
      ['fraction above 1', { type: 'running', runId: 4, message: 'x', fraction: 1.5 }],
      ['fraction below 0', { type: 'running', runId: 4, message: 'x', fraction: -0.1 }],
      ['fraction NaN', { type: 'running', runId: 4, message: 'x', fraction: NaN }],
      ['fraction a string', { type: 'running', runId: 4, message: 'x', fraction: '0.5' }],
      ['an unknown source of the analysed bytes', state({ ...fresh, analysed: 'cloud' })],
      ['an unknown refit mode', state({ ...fresh, refit: 'always' })],
      ['followedOnDisk not a boolean', state({ ...fresh, followedOnDisk: 'yes' })],
      ['a state without refit', state(withField(fresh, 'refit', 'missing'))],
      ['an extra key in the state', state({ ...fresh, html: '<b>' })],
      ['a change of unknown place', state({ ...fresh, change: { ...change, where: 'cloud' } })],
      ['a negative count', state({ ...fresh, change: { ...change, added: -1 } })],
      ['a fractional count', state({ ...fresh, change: { ...change, changed: 0.5 } })],
      ['a count NaN', state({ ...fresh, change: { ...change, removed: NaN } })],
      ['header not a boolean', state({ ...fresh, change: { ...change, header: 1 } })],
      ['a change without counts', state({ ...fresh, change: withField(change, 'added', 'missing') })],
      ['a __proto__ key in the change', state(JSON.parse(`{"analysed":"disk","refit":"manual","followedOnDisk":false,"change":{"__proto__":{"polluted":true},${JSON.stringify(change).slice(1)}}`))],
      ['a change that is text', state({ ...fresh, change: 'rows added' })],
      ['a file URI too long', { type: 'file', uri: `file:///${'a'.repeat(10000)}.csv`, fileName: 'a.csv' }],
      ['a file URI that is a number', { type: 'file', uri: 7, fileName: 'a.csv' }],
    ];
    for (const [what, m] of broken) assert.equal(isHostMessage(m), false, what);
    for (const [key, bad] of [
      ['reason', 'guess'],
      ['largestChange', NaN],
      ['largestChange', -1],
      ['atX', Infinity],
      ['ySpread', -2],
      ['dfNow', 0],
      ['rowsNow', 1.5],
      ['ruleDropped', 'no'],
      ['extra', 1],
    ] as const) {
      assert.equal(isHostMessage({ type: 'result', payload: { ...payload, refit: { ...REFIT, [key]: bad } } }), false, `refit.${key} = ${String(bad)}`);
    }
    assert.equal(isHostMessage({ type: 'result', payload: { ...payload, refit: 'moved' } }), false, 'a refit that is text');
    assert.equal(({} as Record<string, unknown>).polluted, undefined, 'checking polluted nothing');
  });
});

describe('isPanelState', () => {
  it("accepts the state a panel keeps (open sections and the error figure's range included), also after a JSON round trip", () => {
    for (const st of [
      { file: 'file:///data/cars.csv' },
      { file: 'vscode-remote://host/data/cars.csv', runId: 3, rule: { kind: 'pick', df: 5 } },
      { file: 'file:///data/cars.csv', runId: 0, rule: { kind: 'one-se' }, model: { outcome: 'counts', shape: ['increasing'], robust: false } },
      { file: 'file:///data/cars.csv', open: ['residual-checks', 'notes'], errorRange: 'all' },
      { file: 'file:///data/cars.csv', open: [...FOLD_IDS], errorRange: 'decision' },
      { file: 'file:///data/cars.csv', open: [] },
      { file: 'file:///data/cars.csv', runId: 4, candidates: '2..20', allInfluential: true },
      { file: 'file:///data/cars.csv', allInfluential: false },
      { file: 'file:///data/co2.csv', runId: 9, group: 'Qn1' },
    ]) {
      assert.equal(isPanelState(st), true, JSON.stringify(st));
      assert.equal(isPanelState(JSON.parse(JSON.stringify(st))), true, `JSON ${JSON.stringify(st)}`);
    }
  });

  it('refuses a state without a file, with wrong fields or extra keys, unknown or repeated sections, or with prototype keys', () => {
    for (const st of [
      undefined,
      null,
      'file:///data/cars.csv',
      {},
      { file: '' },
      { file: 7 },
      { file: `file:///${'a'.repeat(10000)}` },
      { file: 'file:///a.csv', runId: -1 },
      { file: 'file:///a.csv', runId: NaN },
      { file: 'file:///a.csv', rule: { kind: 'lowest' } },
      { file: 'file:///a.csv', model: { outcome: 'gaussian', shape: [], robust: false } },
      { file: 'file:///a.csv', html: '<img>' },
      { file: 'file:///a.csv', open: ['residual-checks', 'residual-checks'] },
      { file: 'file:///a.csv', open: ['warnings'] },
      { file: 'file:///a.csv', open: 'notes' },
      { file: 'file:///a.csv', open: [7] },
      { file: 'file:///a.csv', open: [...FOLD_IDS, 'notes'] },
      { file: 'file:///a.csv', errorRange: 'some' },
      { file: 'file:///a.csv', errorRange: true },
      { file: 'file:///a.csv', candidates: '12..2' },
      { file: 'file:///a.csv', candidates: 12 },
      { file: 'file:///a.csv', allInfluential: 'yes' },
      { file: 'file:///a.csv', group: '' },
      { file: 'file:///a.csv', group: 7 },
      { file: 'file:///a.csv', group: HUGE },
      JSON.parse('{"file":"file:///a.csv","__proto__":{"polluted":true}}'),
      Object.create({ file: 'file:///a.csv' }) as object,
    ]) {
      assert.equal(isPanelState(st), false, JSON.stringify(st)?.slice(0, 80));
    }
    assert.equal(({} as Record<string, unknown>).polluted, undefined, 'checking polluted nothing');
  });
});
