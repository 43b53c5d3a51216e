/**
 * The one caution every deliverable, the panel and the command line carry: an empirical
 * fit is no certified calibration, and safety-related use defers to the applicable
 * standards and qualified review. SURFACE_CAUTION says the same of a surface of two inputs.
 */
export const CAUTION =
  'This curve is an empirical fit to the readings shown, not a certified calibration. ' +
  'Where its table feeds safety-related equipment or decisions, use it only as the applicable standards allow and after review by qualified people.';

/** The caution of a surface of two inputs and its 2-D table (the same words as CAUTION). */
export const SURFACE_CAUTION = CAUTION.replace('This curve is', 'This surface is');
