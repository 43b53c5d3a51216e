/**
 * The curve figure (the readings, or their density grid beneath the curve and its bands)
 * and, as its own part of the layout, the model controls that change it.
 */
import type { PanelPayload } from '../../core/view/model';
import { modelControls, type ModelControls } from '../controls/modelControls';
import { el, replaceChildren } from '../dom';
import { keyedFigure } from '../figures';
import type { PanelActions, Section } from './section';

/** The curve section and the model controls beside it. */
export interface CurveSection extends Section {
  readonly model: ModelControls;
}

/** Builds the curve figure's section of payload `p`. */
export function curveSection(p: PanelPayload, actions: PanelActions): CurveSection {
  const element = el('section', { class: 'kw-curve-section', id: 'kw-curve-section', 'aria-label': 'The fitted curve' });
  const model = modelControls(p, (m) => actions.changeModel(m));
  return {
    element,
    model,
    show(c) {
      replaceChildren(element, keyedFigure('curve', c.view));
    },
  };
}
