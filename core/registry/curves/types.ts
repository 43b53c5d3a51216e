/**
 * What a curve kind is: its words, its default candidates, what it supports, how it fits
 * and how the resampling engine refits it. One module per kind, registered once in
 * core/registry/curves/index.ts; nobody else switches on a kind's name. Adding a kind is
 * one module plus one line (or one `registerCurveKind` call).
 */
import type { FitError } from '../../errors';
import type { ModelBasis, ResolvedModel } from '../../fit/modelTypes';
import type { Cells } from '../../fit/powerSums/cells';
import type { SplineFromSums } from '../../fit/powerSums/splineSums';
import type { PreparedData } from '../../fit/prepared';
import type { OutcomeFamily } from '../../fit/glm';
import type { FitResult, Outcome } from '../../types';

/** Predicts at test rows after training on weighted rows: one per candidate. */
export interface Trainer {
  /** Trains with the given row weights (0 = not in training); false when rank deficient. */
  train(weights: Float64Array, sums: Float64Array | undefined): boolean;
  /** Prediction for row i after training (in the engine's centred, scaled y units). */
  predict(i: number): number;
  /** Counts and proportions: the predicted mean in y units. */
  mean?(i: number): number;
  /** Counts and proportions: the distribution whose deviance scores held-out rows. */
  readonly scoring?: OutcomeFamily | undefined;
}

/** What the engine hands a curve kind to build its trainers. */
export interface TrainerInput {
  /** The tuning rows with y centred and scaled (prepareData of { x, y: yc, w }). */
  readonly prepared: PreparedData;
  readonly x: Float64Array;
  /** y centred and scaled: (y - ymean) / yscale. */
  readonly yc: Float64Array;
  /** Each candidate's knots (CurveKind.resampleKnots), when the kind gives them. */
  readonly knots?: readonly Float64Array[] | undefined;
  /** y as read. */
  readonly y: Float64Array;
  readonly w: Float64Array | undefined;
  /** Candidate df, each fitted to all tuning rows already. */
  readonly dfs: readonly number[];
  /** Per-candidate numbers from the full fits (resampleParams: the smoothing spline's lambdaScaled), or undefined. */
  readonly params: readonly number[] | undefined;
  /** Outcome, shapes, robust fitting; undefined for plain least squares. */
  readonly model: ResolvedModel | undefined;
  readonly ymean: number;
  readonly yscale: number;
  /**
   * The power-sum path's cells when they were built once for the run (core/tune/engine.ts
   * sharedRows): their breaks and each candidate's knots. The cells then carry no rows.
   */
  readonly sumCells?: { readonly breaks: Float64Array; readonly knots: readonly Float64Array[] } | undefined;
}

/** The trainers of every candidate and, for the power-sum fast path, the cells, the models fitted from sums and each candidate's knots. */
export interface TrainerSet {
  readonly trainers: Trainer[];
  readonly cells?: Cells | undefined;
  readonly models?: SplineFromSums[] | undefined;
  readonly knots?: Float64Array[] | undefined;
}

/** What a curve kind supports besides plain weighted least squares. */
export interface CurveSupport {
  readonly outcomes: readonly Outcome[];
  /** Shape constraints (increasing, convex, ...); a limit in words where one applies. */
  readonly shapes: boolean;
  readonly robust: boolean;
}

export interface CurveKind {
  /** Command-line, setting and record value (a spelled-out trade name). */
  readonly id: string;
  /** Plain-language name in sentences: 'natural cubic regression spline'. */
  readonly name: string;
  /** One line for help texts and settings descriptions. */
  readonly description: string;
  readonly supports: CurveSupport;
  /** Default candidate df for data with `distinct` distinct x. */
  defaultCandidates(distinct: number): number[];
  /** Plain weighted least-squares fit at df with complete output; FitError when the data cannot support df. */
  fit(prepared: PreparedData, df: number): FitResult;
  /** Several df at once when the kind can share work (else fit is called per df). */
  fitAll?(prepared: PreparedData, dfs: readonly number[]): Map<number, FitResult | FitError>;
  /** Row basis for outcomes, shapes and robust fits by core/fit/model.ts (kinds with a finite basis). */
  rowBasis?(prepared: PreparedData, df: number, model: ResolvedModel): ModelBasis;
  /** The kind's own fit with model options, where it does not go through a row basis. */
  fitModel?(prepared: PreparedData, df: number, model: ResolvedModel): FitResult;
  /** Checks model options the kind can take only within limits (e.g. size); throws InputError. */
  checkModel?(model: ResolvedModel, distinct: number): void;
  /** Per-candidate numbers the resample trainers need from the full fits (the smoothing spline's lambda for x scaled to [0, 1] over the tuning rows' range). */
  resampleParams?(fits: readonly FitResult[]): number[];
  /**
   * Each candidate's knots as its plain resample trainers need them (the same the fit to
   * all rows places), or the FitError that will skip the candidate: given, the resampling
   * starts before those fits (core/tune/tune.ts) and need not place the knots again.
   */
  resampleKnots?(prepared: PreparedData, dfs: readonly number[]): Map<number, Float64Array | FitError>;
  /** Trainers that refit every candidate on a resample's weighted rows. */
  trainers(input: TrainerInput): TrainerSet;
}
