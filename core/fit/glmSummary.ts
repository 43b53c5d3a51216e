import type { Curve, CurveKindId, FitResult, ModelReport, XYData } from '../types';
import type { OutcomeFamily } from './glm';

/** What a Poisson or binomial fit hands to `summariseGlm`. */
export interface SolvedGlm {
  readonly kind: CurveKindId;
  readonly df: number;
  readonly curve: Curve;
  readonly coefficients: Float64Array;
  readonly knots: Float64Array;
  readonly eta: Float64Array;
  readonly mu: Float64Array;
  /** Hat diagonal with the final working weights. */
  readonly leverage: Float64Array;
  readonly notes: readonly string[];
  /** The model report without its `glm` part (filled in here). */
  readonly report: Omit<ModelReport, 'glm'>;
}

/**
 * Residuals and summary statistics of a Poisson or binomial fit (McCullagh & Nelder,
 * Generalized Linear Models, 2nd ed., 1989, sections 2.4 and 12.5), with R's glm
 * conventions so they can be checked against it:
 *
 * - deviance D = sum d_i, d_i the family's unit deviance times the prior weight; null
 *   deviance at the weighted mean of y; deviance residuals sign(y - mu) sqrt(d_i);
 *   Pearson residuals (y - mu) sqrt(w) / sqrt(V(mu)), chi-square their sum of squares,
 *   dispersion chi-square / (n - df);
 * - `residuals` are response residuals y - mu, `rss` their weighted sum of squares, `sigma`
 *   1 (the dispersion of both families), `r2` the share of the null deviance explained;
 * - log-likelihood as R's logLik.glm; AIC = -2 logLik + 2 df (no scale parameter),
 *   AICc with K = df, BIC = -2 logLik + log(n) df;
 * - Cook's distance (r_P / (1 - h))^2 h / df with Pearson residuals r_P (Williams 1987,
 *   "Generalized linear model diagnostics using the deviance and single case deletions",
 *   Applied Statistics 36; R's cooks.distance.glm);
 * - `looRmse` from the one-step approximation of each row's deletion,
 *   eta_(i) = eta_i - h_i (z_i - eta_i) / (1 - h_i) with z the working response (Pregibon
 *   1981, "Logistic regression diagnostics", Annals of Statistics 9), on the response scale;
 * - `gcv` = (D / n) / (1 - df / n)^2, the deviance form of generalised cross-validation
 *   (O'Sullivan, Yandell & Raynor 1986, JASA 81).
 * Cost O(n). Example: summariseGlm(data, poissonFamily, solved).model.glm.deviance.
 */
export function summariseGlm(data: XYData, fam: OutcomeFamily, s: SolvedGlm): FitResult {
  const { y, w } = data;
  const n = y.length;
  const df = s.df;
  const residuals = new Float64Array(n);
  const pearson = new Float64Array(n);
  const devRes = new Float64Array(n);
  const cooks = new Float64Array(n);
  let dev = 0;
  let chi2 = 0;
  let rss = 0;
  let sw = 0;
  let swy = 0;
  let logLik = 0;
  let loo = 0;
  let looInfinite = false;
  let atBound = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    const yi = y[i] as number;
    const mu = s.mu[i] as number;
    const r = yi - mu;
    residuals[i] = r;
    rss += wi * r * r;
    sw += wi;
    swy += wi * yi;
    const d = fam.deviance(yi, mu, wi);
    dev += d;
    devRes[i] = (r > 0 ? 1 : r < 0 ? -1 : 0) * Math.sqrt(Math.max(0, d));
    const pr = (r * Math.sqrt(wi)) / Math.sqrt(fam.variance(mu));
    pearson[i] = pr;
    chi2 += pr * pr;
    logLik += fam.logLik(yi, mu, wi);
    const h = s.leverage[i] as number;
    cooks[i] = 1 - h <= 1e-10 ? NaN : ((pr / (1 - h)) * (pr / (1 - h)) * h) / df;
    if (1 - h <= 1e-10) {
      looInfinite ||= Math.abs(r) > 0;
    } else {
      const eta = s.eta[i] as number;
      const step = (h * (r / fam.muEta(eta))) / (1 - h);
      const e = yi - fam.linkinv(eta - step);
      loo += wi * e * e;
    }
    if (mu <= 1e-10 * Math.max(1, yi) || (fam.outcome === 'proportions' && mu >= 1 - 1e-10)) atBound++;
  }
  const ybar = swy / sw;
  let nullDev = 0;
  for (let i = 0; i < n; i++) nullDev += fam.deviance(y[i] as number, ybar, w ? (w[i] as number) : 1);
  const residualDf = n - df;
  const dispersion = residualDf > 0 ? chi2 / residualDf : NaN;
  const notes = [...s.notes];
  // The dispersion is judged, with what to do, by the residual checks (core/analysis/dispersion.ts), once.
  if (atBound > 0) {
    notes.push(fam.boundNote(atBound));
  }
  if (looInfinite) notes.push('Some rows have leverage 1, so their leave-one-out error is undefined; the leave-one-out RMSE is reported as infinite.');
  const aic = -2 * logLik + 2 * df;
  const model: ModelReport = {
    ...s.report,
    glm: { deviance: dev, nullDeviance: nullDev, pearsonChi2: chi2, dispersion, pearsonResiduals: pearson, devianceResiduals: devRes, linearPredictor: s.eta },
  };
  return {
    kind: s.kind,
    df,
    n,
    residualDf,
    curve: s.curve,
    coefficients: s.coefficients,
    knots: s.knots,
    fitted: s.mu,
    residuals,
    leverage: s.leverage,
    cooksDistance: cooks,
    rss,
    sigma: 1,
    r2: nullDev > 0 ? 1 - dev / nullDev : NaN,
    logLik,
    aic,
    aicc: n - df - 1 > 0 ? aic + (2 * df * (df + 1)) / (n - df - 1) : Infinity,
    bic: -2 * logLik + Math.log(n) * df,
    looRmse: looInfinite ? Infinity : Math.sqrt(loo / sw),
    gcv: dev / n / ((1 - df / n) * (1 - df / n)),
    notes,
    model,
  };
}
