/**
 * The settings snapshot: defaults equal the command line's documented defaults
 * (the command line's help: natural-spline, bootstrap:50, one-se, seed 1, 8 digits, least squares,
 * Huber k = 1.345), values outside their limits fall back with a message, and the
 * contributed schema in package.json has the same defaults.
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { analysisOptions, DEFAULTS, modelOptions, readSettings } from '../../../extension/settings';
import { DEFAULT_INVERSE } from '../../../core/calibrate/spec';

describe('settings snapshot (readSettings)', function () {
  it('readSettings() with nothing set gives the command line defaults', function () {
    const s = readSettings(() => undefined);
    assert.equal(s.kind, 'natural-spline');
    assert.deepEqual(s.resample, { kind: 'bootstrap', resamples: 50 });
    assert.deepEqual(s.rule, { kind: 'one-se' });
    assert.equal(s.seed, 1);
    assert.equal(s.digits, 8);
    assert.equal(s.candidates, undefined);
    assert.equal(s.grid, undefined);
    assert.deepEqual(s.model, { outcome: 'continuous', shape: [], robustK: undefined });
    assert.equal(s.refitOnSave, true);
    assert.equal(s.refitAskAboveRows, 200000);
    assert.deepEqual(s.problems, []);
  });

  it('readSettings() takes every grid form of the command line (core/table/grid.ts parseGrid)', function () {
    const forms: Record<string, unknown> = {
      '0:10:count=21': { kind: 'count', start: 0, stop: 10, count: 21 },
      '0:10:step=0.5': { kind: 'step', start: 0, stop: 10, step: 0.5 },
      data: { kind: 'data' },
      '1,2.5,4': { kind: 'list', values: [1, 2.5, 4] },
      'auto:0.01': { kind: 'auto', tolerance: 0.01 },
      '0:10:auto=0.01': { kind: 'auto', tolerance: 0.01, start: 0, stop: 10 },
    };
    for (const [text, grid] of Object.entries(forms)) {
      const s = readSettings((k) => (k === 'table.grid' ? text : undefined));
      assert.deepEqual(s.grid, grid, text);
      assert.deepEqual(s.problems, [], text);
    }
    const bad = readSettings((k) => (k === 'table.grid' ? 'auto:-1' : undefined));
    assert.equal(bad.grid, undefined);
    assert.match(bad.problems.join(), /knotwise\.table\.grid: .*tolerance/);
  });

  it("model settings become the command line's model options; combinations the curve kind cannot fit are dropped with a message", function () {
    const raw: Record<string, unknown> = { outcome: 'counts', shape: ['convex', 'increasing'] };
    const s = readSettings((k) => raw[k]);
    assert.deepEqual(s.model, { outcome: 'counts', shape: ['increasing', 'convex'], robustK: undefined });
    assert.deepEqual(analysisOptions(s), {
      kind: 'natural-spline',
      candidates: undefined,
      resample: { kind: 'bootstrap', resamples: 50 },
      rule: { kind: 'one-se' },
      seed: 1,
      holdout: undefined,
      outcome: 'counts',
      shape: ['increasing', 'convex'],
    });
    // --robust is Huber with k = 1.345 (core/fit/robust.ts HUBER_K); another k is --robust-k.
    const read = (values: Record<string, unknown>) => readSettings((k) => values[k]);
    assert.deepEqual(modelOptions(read({ robust: true }).model), { robust: true });
    assert.deepEqual(modelOptions(read({ robust: true, robustK: 2 }).model), { robust: { k: 2 } });
    // The smoothing spline fits least squares only (shapes yes, up to 1000 distinct x); robust
    // fitting needs continuous readings; opposite shapes are refused.
    const smooth = read({ curve: 'smoothing-spline', outcome: 'proportions', shape: ['convex'] });
    assert.deepEqual(smooth.model, { outcome: 'continuous', shape: ['convex'], robustK: undefined });
    assert.equal(smooth.problems.length, 1, smooth.problems.join('\n'));
    const mixed = read({ outcome: 'counts', robust: true, shape: ['increasing', 'decreasing'], robustK: -1 });
    assert.deepEqual(mixed.model, { outcome: 'counts', shape: [], robustK: undefined });
    assert.equal(mixed.problems.length, 3, mixed.problems.join('\n'));
    assert.ok(mixed.problems.some((p) => p.startsWith('knotwise.robust: ')));
  });

  it('readSettings() refuses values outside their limits and says which', function () {
    const raw: Record<string, unknown> = { resampling: 'bootstrap:1', 'table.significantDigits': 40, rule: 'median', 'output.tableName': '../x.csv', candidates: '5..2' };
    const s = readSettings((k) => raw[k]);
    assert.deepEqual(s.resample, { kind: 'bootstrap', resamples: 50 });
    assert.equal(s.digits, 8);
    assert.deepEqual(s.rule, { kind: 'one-se' });
    assert.equal(s.tableName, DEFAULTS.tableName);
    assert.equal(s.candidates, undefined);
    assert.equal(s.problems.length, 5, s.problems.join('\n'));
    assert.ok(s.problems.some((p) => p.includes('knotwise.resampling')));
    const refit = readSettings((k) => ({ 'refit.askAboveRows': -5, 'refit.onSave': 'yes' })[k]);
    assert.equal(refit.refitAskAboveRows, DEFAULTS.refitAskAboveRows);
    assert.equal(refit.refitOnSave, true, 'a value that is not true or false keeps the default');
    assert.match(refit.problems.join(), /knotwise\.refit\.askAboveRows must be a whole number from 0/);
  });

  it('the simplest-within rule takes its percentage from knotwise.tolerancePercent', function () {
    const raw: Record<string, unknown> = { rule: 'simplest-within', tolerancePercent: 5 };
    assert.deepEqual(readSettings((k) => raw[k]).rule, { kind: 'simplest-within', percent: 5 });
  });

  it('readSettings() reads the group settings: off by default (the command line without --shared-df and --long-table), true when set, a value that is not true or false ignored with a message', function () {
    assert.deepEqual(readSettings(() => undefined).groups, { sharedDf: false, longTable: false });
    const on: Record<string, unknown> = { 'groups.sharedDf': true, 'groups.longTable': true };
    const s = readSettings((k) => on[k]);
    assert.deepEqual(s.groups, { sharedDf: true, longTable: true });
    assert.deepEqual(s.problems, []);
    const bad: Record<string, unknown> = { 'groups.sharedDf': 'yes', 'groups.longTable': 1 };
    const b = readSettings((k) => bad[k]);
    assert.deepEqual(b.groups, { sharedDf: false, longTable: false });
    assert.deepEqual(b.problems, ['knotwise.groups.sharedDf must be true or false; using false', 'knotwise.groups.longTable must be true or false; using false']);
  });

  it('package.json declares every setting readSettings reads, with the same defaults', function () {
    const ext = vscode.extensions.all.find((e) => e.packageJSON?.name === 'knotwise');
    assert.ok(ext, 'the Knotwise extension is loaded');
    const props = ext.packageJSON.contributes.configuration.properties as Record<string, { default: unknown }>;
    const expected: Record<string, unknown> = {
      'knotwise.curve': DEFAULTS.kind,
      'knotwise.outcome': DEFAULTS.outcome,
      'knotwise.shape': DEFAULTS.shape,
      'knotwise.robust': DEFAULTS.robust,
      'knotwise.robustK': DEFAULTS.huberK,
      'knotwise.candidates': DEFAULTS.candidates,
      'knotwise.resampling': DEFAULTS.resampling,
      'knotwise.rule': DEFAULTS.rule,
      'knotwise.tolerancePercent': DEFAULTS.tolerancePercent,
      'knotwise.seed': DEFAULTS.seed,
      'knotwise.holdoutFraction': DEFAULTS.holdoutFraction,
      'knotwise.table.grid': DEFAULTS.grid,
      'knotwise.table.extrapolate': DEFAULTS.extrapolate,
      'knotwise.table.flagNegative': DEFAULTS.flagNegative,
      'knotwise.table.significantDigits': DEFAULTS.significantDigits,
      'knotwise.output.folder': DEFAULTS.outputFolder,
      'knotwise.output.tableName': DEFAULTS.tableName,
      'knotwise.output.recordName': DEFAULTS.recordName,
      'knotwise.refit.onSave': DEFAULTS.refitOnSave,
      'knotwise.refit.askAboveRows': DEFAULTS.refitAskAboveRows,
      'knotwise.inverse.write': false,
      'knotwise.inverse.grid': '',
      'knotwise.inverse.readingsAveraged': DEFAULT_INVERSE.readingsAveraged,
      'knotwise.inverse.referenceUncertainty': DEFAULT_INVERSE.referenceUncertainty,
      'knotwise.inverse.maxIntervalWidth': 0,
      'knotwise.groups.sharedDf': DEFAULTS.groupsSharedDf,
      'knotwise.memoryBudget': DEFAULTS.memoryBudget,
      'knotwise.groups.longTable': DEFAULTS.groupsLongTable,
    };
    assert.deepEqual(Object.keys(props).sort(), Object.keys(expected).sort());
    for (const [k, v] of Object.entries(expected)) assert.deepEqual(props[k]?.default, v, k);
  });
});
