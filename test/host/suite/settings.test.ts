/**
 * The settings snapshot: defaults equal the command line's documented defaults
 * (core/node/cli.ts usage text: natural, boot:50, 1se, seed 1, 8 digits), values outside
 * their limits fall back with a message, and the contributed schema in package.json has
 * the same defaults.
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { DEFAULTS, readSettings } from '../../../extension/settings';

describe('settings snapshot (readSettings)', function () {
  it('readSettings() with nothing set gives the command line defaults', function () {
    const s = readSettings(() => undefined);
    assert.equal(s.family, 'natural');
    assert.deepEqual(s.resample, { kind: 'boot', resamples: 50 });
    assert.deepEqual(s.rule, { kind: '1se' });
    assert.equal(s.seed, 1);
    assert.equal(s.digits, 8);
    assert.equal(s.candidates, undefined);
    assert.equal(s.grid, undefined);
    assert.deepEqual(s.problems, []);
  });

  it('readSettings() refuses values outside their limits and says which', function () {
    const raw: Record<string, unknown> = { resampling: 'boot:3', 'table.significantDigits': 40, rule: 'median', 'output.tableName': '../x.csv', candidates: '5..2' };
    const s = readSettings((k) => raw[k]);
    assert.deepEqual(s.resample, { kind: 'boot', resamples: 50 });
    assert.equal(s.digits, 8);
    assert.deepEqual(s.rule, { kind: '1se' });
    assert.equal(s.tableName, DEFAULTS.tableName);
    assert.equal(s.candidates, undefined);
    assert.equal(s.problems.length, 5, s.problems.join('\n'));
    assert.ok(s.problems.some((p) => p.includes('knotwise.resampling')));
  });

  it('the tolerance rule takes its percentage from knotwise.tolerancePercent', function () {
    const raw: Record<string, unknown> = { rule: 'tolerance', tolerancePercent: 5 };
    assert.deepEqual(readSettings((k) => raw[k]).rule, { kind: 'tol', percent: 5 });
  });

  it('package.json declares every setting readSettings reads, with the same defaults', function () {
    const ext = vscode.extensions.all.find((e) => e.packageJSON?.name === 'knotwise');
    assert.ok(ext, 'the Knotwise extension is loaded');
    const props = ext.packageJSON.contributes.configuration.properties as Record<string, { default: unknown }>;
    const expected: Record<string, unknown> = {
      'knotwise.curveFamily': DEFAULTS.family,
      'knotwise.candidates': DEFAULTS.candidates,
      'knotwise.resampling': DEFAULTS.resampling,
      'knotwise.rule': DEFAULTS.rule,
      'knotwise.tolerancePercent': DEFAULTS.tolerancePercent,
      'knotwise.seed': DEFAULTS.seed,
      'knotwise.holdoutFraction': DEFAULTS.holdoutFraction,
      'knotwise.table.grid': DEFAULTS.grid,
      'knotwise.table.extrapolate': DEFAULTS.extrapolate,
      'knotwise.table.significantDigits': DEFAULTS.significantDigits,
      'knotwise.output.folder': DEFAULTS.outputFolder,
      'knotwise.output.tableName': DEFAULTS.tableName,
      'knotwise.output.recordName': DEFAULTS.recordName,
    };
    assert.deepEqual(Object.keys(props).sort(), Object.keys(expected).sort());
    for (const [k, v] of Object.entries(expected)) assert.deepEqual(props[k]?.default, v, k);
  });
});
