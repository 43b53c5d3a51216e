/**
 * What the panel's sections share: the choice they show and what they may ask of the
 * panel. A section is built once per result (its controls keep their focus and typing
 * across choices) and shown again for every choice of df.
 */
import type { FoldId } from '../../core/protocol';
import type { RuleSpec, Selection } from '../../core/tune/types';
import type { FigureView } from '../../core/view/figureCatalogue';
import type { FitDetail, ModelChoice, PanelPayload } from '../../core/view/model';

/** The choice of df on show, and everything drawn from it. */
export interface Choice {
  readonly payload: PanelPayload;
  readonly selection: Selection;
  /** Residual details of the chosen df; undefined while the host computes them. */
  readonly detail: FitDetail | undefined;
  /** What the figure catalogue draws from. */
  readonly view: FigureView;
  /** The rule on show (the panel's, which may differ from the selection's when it could not choose). */
  readonly rule: RuleSpec;
  /** The tolerance in effect: the simplest-within rule's, or the one it would use. */
  readonly tolerance: number;
  /** True when the person asked to see every listed influential row, not only the first ten. */
  readonly allInfluential: boolean;
}

/** What a section may ask of the panel. */
export interface PanelActions {
  /** Use this rule (a df picked by hand included) and show its choice. */
  setRule(rule: RuleSpec): void;
  /** Remember this tolerance (a valid one) and, with the simplest-within rule, choose again with it. */
  setTolerance(percent: number): void;
  /** Show every candidate in the error figure, or the window around the decision. */
  setErrorRange(range: 'decision' | 'all'): void;
  /** A folding section opened or closed. */
  foldToggled(id: FoldId, open: boolean): void;
  /** Run the analysis again with these model options. */
  changeModel(model: ModelChoice): void;
  /** Run the analysis again with these candidate df (the command line's --df text, e.g. '2..20'). */
  widenCandidates(candidates: string): void;
  /** Save the inverse table with the curve table from now on, or not. */
  setInverseSaved(save: boolean): void;
  /** Show every listed influential row, or only the first ten. */
  setAllInfluential(all: boolean): void;
  save(): void;
  rerun(): void;
  stop(): void;
  /** Open a folding section and move the focus to its title. */
  openFold(id: FoldId): void;
}

/** A part of the panel. */
export interface Section {
  readonly element: HTMLElement;
  /** Shows one choice of df. */
  show(choice: Choice): void;
}

/** The first letter in capitals. */
export function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
