import { InputError } from '../../errors';
import { sig } from '../../tune/format';
import type { RuleSpec } from '../../tune/types';
import { named } from './common';
import type { SelectionRule } from './types';

type PickDf = Extract<RuleSpec, { kind: 'pick' }>;

/** A df the person picks from the evaluated candidates, recorded as such. */
export const pickDf: SelectionRule<PickDf> = {
  id: 'pick',
  syntax: 'pick:<df>',
  pattern: 'pick:\\d+(\\.\\d+)?',
  label: 'A df I pick',
  description: 'a df you pick from the candidates (recorded as your choice)',
  setting: false,
  parse(text) {
    const m = /^pick:(\d+(?:\.\d+)?)$/.exec(text);
    return m ? { kind: 'pick', df: Number(m[1]) } : undefined;
  },
  format: (r) => `pick:${r.df}`,
  words: () => 'df picked by the person',
  pick(r, ctx) {
    const { list, head, metricName, num } = ctx;
    const c = list.find((u) => u.df === r.df);
    if (!c) throw new InputError(`${named(ctx, r.df)} was picked but is not an evaluated candidate (candidates: ${list.map((u) => (ctx.label ? ctx.label(u.df) : String(u.df))).join(', ')})`);
    return { chosen: c, sentence: `${head} ${named(ctx, c.df)} was picked by the person (mean ${metricName} ${num(c.e.mean)}${Number.isFinite(c.e.se) ? `, SE ${sig(c.e.se, 2)}` : ''}).` };
  },
};
