import { InputError } from '../core/errors';
import type { DesignRows } from '../core/stats/design';
import { pchisq } from '../core/stats/distributions';
import { GivensQR } from '../core/stats/givensQR';

/** Result of the Breusch-Pagan test for a spread that changes with the regressors. */
export interface BreuschPaganResult {
  /** n R^2 of the auxiliary regression of the squared residuals on the design. */
  readonly statistic: number;
  /** Design columns minus the intercept. */
  readonly df: number;
  /** Upper chi-square tail with df degrees of freedom. */
  readonly pValue: number;
}

/**
 * Breusch-Pagan test of constant error variance in Koenker's studentised form: Breusch &
 * Pagan (1979), "A simple test for heteroscedasticity and random coefficient variation",
 * Econometrica 47(5), 1287-1294; Koenker (1981), "A note on studentizing a test for
 * heteroscedasticity", Journal of Econometrics 17(1), 107-112. With u_i = e_i^2 - mean(e^2),
 * the statistic is n * (fitted sum of squares / total sum of squares) of the regression
 * of u on the design (intercept included), referred to chi-square with p - 1 df; this is
 * R's lmtest::bptest default (studentize = TRUE). The auxiliary regression is solved by
 * row-wise Givens QR (`GivensQR`): O(n p^2) time, O(p^2) memory.
 *
 * Throws InputError for fewer than p + 1 residuals, fewer than 2 design columns,
 * non-finite residuals or squared residuals that are all equal; FitError for a
 * rank-deficient design.
 * Example: breuschPagan(residuals, denseDesign(rowsOf1AndX, 2)) tests whether the spread
 * grows or shrinks with x.
 */
export function breuschPagan(residuals: Float64Array, design: DesignRows): BreuschPaganResult {
  const n = residuals.length;
  const p = design.p;
  if (p < 2) throw new InputError(`Breusch-Pagan needs an intercept and at least one regressor; the design has ${p} column(s)`);
  if (n <= p) throw new InputError(`Breusch-Pagan needs more residuals (${n}) than design columns (${p})`);
  let meanSquare = 0;
  for (let i = 0; i < n; i++) {
    const v = residuals[i] as number;
    if (!Number.isFinite(v)) throw new InputError(`Breusch-Pagan: residual ${i + 1} is not a finite number (${v})`);
    meanSquare += v * v;
  }
  meanSquare /= n;
  const qr = new GivensQR(p);
  const row = new Float64Array(p);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const e = residuals[i] as number;
    const u = e * e - meanSquare;
    total += u * u;
    design.row(i, row);
    qr.addRow(row, u);
  }
  qr.checkRank();
  if (!(total > 0)) throw new InputError('Breusch-Pagan: the squared residuals are all equal, so the test is undefined');
  let fitted = 0;
  for (let j = 0; j < p; j++) fitted += (qr.qty[j] as number) * (qr.qty[j] as number);
  const statistic = (n * fitted) / total;
  const df = p - 1;
  return { statistic, df, pValue: pchisq(statistic, df, false) };
}
