/**
 * What an outcome is: what the readings are, in an engineer's words, with the distribution
 * and link behind them. One module per outcome, listed once in core/registry/outcomes/index.ts.
 */
import type { OutcomeFamily } from '../../fit/glm';
import type { Outcome } from '../../types';

export interface OutcomeKind<O extends Outcome = Outcome> {
  /** Command-line, setting and record value. */
  readonly id: O;
  /** Label in the panel's chooser: what the readings are. */
  readonly label: string;
  /** One line for help texts and settings descriptions, naming the distribution and the link. */
  readonly description: string;
  /** The distribution's trade name, for reports. */
  readonly distribution: string;
  readonly link: 'identity' | 'log' | 'logit';
  /** Link, variance and deviance for the reweighted fit; undefined for least squares. */
  readonly glm: OutcomeFamily | undefined;
  /** The error the rules compare by default. */
  readonly metric: 'rmse' | 'deviance';
  /** The share of variation explained, as reports name it: 'R²' or 'deviance explained'. */
  readonly explainedName: string;
  /** The outcome in one phrase. robustK: Huber constant or undefined; trialsLabel: the trials column, if any. */
  words(robustK: number | undefined, trialsLabel: string | undefined): string;
}
