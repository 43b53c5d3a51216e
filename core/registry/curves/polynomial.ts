import { OrthoPolyBasis } from '../../basis/orthoPoly';
import { FitError } from '../../errors';
import type { ModelBasis } from '../../fit/modelTypes';
import { fitPolynomial } from '../../fit/polynomial';
import type { PreparedData } from '../../fit/prepared';
import { basisTrainer, constantBasis } from '../../tune/basisTrainer';
import { dfRange, rowBasisModelTrainers } from './rowBasisTrainers';
import type { CurveKind } from './types';

/** Largest default df (degree 7): higher degrees are rarely defensible (common practice). */
const DEFAULT_MAX_DF = 8;

/** Orthogonal polynomial basis of degree df - 1 (a constant at df 1). FitError when the data cannot support df. Cost O(n df). */
function rowBasis(prepared: PreparedData, df: number): ModelBasis {
  const { sortedX } = prepared;
  if (!(df >= 1) || !Number.isInteger(df)) throw new FitError(`polynomial df must be a whole number of at least 1; got ${df}`);
  if (df > prepared.distinct) throw new FitError(`polynomial with df ${df} needs at least ${df} distinct x values; the data has ${prepared.distinct}`);
  const basis = df === 1 ? constantBasis : new OrthoPolyBasis(sortedX, prepared.data.x, df - 1);
  return { basis, z: undefined, shape: undefined, knots: new Float64Array(0), lower: sortedX[0] as number, upper: sortedX[sortedX.length - 1] as number, notes: [], what: `polynomial with df ${df}` };
}

/** Polynomial of degree df - 1 in an orthogonal basis: a baseline that shows why splines win. */
export const polynomial: CurveKind = {
  id: 'polynomial',
  name: 'polynomial (orthogonal basis)',
  description: 'polynomial of degree df - 1 in an orthogonal basis (a baseline)',
  supports: { outcomes: ['continuous', 'counts', 'proportions'], shapes: false, robust: true },
  defaultCandidates: (distinct) => dfRange(1, Math.max(1, Math.min(DEFAULT_MAX_DF, distinct))),
  fit: fitPolynomial,
  rowBasis,
  trainers(input) {
    if (input.model) return rowBasisModelTrainers(polynomial, input);
    const { prepared, x, yc } = input;
    return { trainers: input.dfs.map((df) => basisTrainer(x, yc, rowBasis(prepared, df).basis, `polynomial with df ${df}`)) };
  },
};
