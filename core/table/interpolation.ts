/**
 * How far a curve strays from the straight lines joining the rows of its table: the error a
 * program makes when it interpolates the table linearly instead of evaluating the curve.
 */

/** Where the largest gap lies and how large it is. */
export interface InterpolationError {
  /** Largest |curve(x) - linear interpolation of the table at x| over the table's x range. */
  readonly maxError: number;
  /** The x where it occurs. */
  readonly at: number;
}

/** Evenly spaced evaluations inside each interval between two table rows (a Knotwise default). */
export const SAMPLES_PER_INTERVAL = 32;
/** Golden-section steps that refine each sampled local maximum (bracket shrinks by 0.618^48, about 1e-10). */
const REFINE_STEPS = 48;
/** 1 / golden ratio. */
const INV_PHI = (Math.sqrt(5) - 1) / 2;

/** |value(x) - line through (x0, y0) with the given slope|. */
function gapAt(value: (x: number) => number, x: number, x0: number, y0: number, slope: number): number {
  return Math.abs(value(x) - (y0 + slope * (x - x0)));
}

/**
 * Largest gap between `value` and the broken line through (nodeX[i], nodeY[i]), for nodes in
 * increasing x (pass the table's values as printed, so rounding counts too). Each interval is
 * evaluated at SAMPLES_PER_INTERVAL + 1 evenly spaced points, ends included; each sampled
 * local maximum of the gap is then refined by golden-section search (Kiefer 1953,
 * "Sequential minimax search for a maximum", Proc. Amer. Math. Soc. 4(3), 502-506). For a
 * curve with a continuous second derivative the gap on an interval of width h is at most
 * h^2 max|f''| / 8 (de Boor, "A Practical Guide to Splines", 1978, chapter II, from memory),
 * so evenly spaced samples alone find the maximum to within about 0.1 %, and the refinement
 * closes the rest. Stops early and returns as soon as the gap exceeds `stopAbove`.
 * Cost: O(nodes x (SAMPLES_PER_INTERVAL + REFINE_STEPS)) evaluations, no allocation per node.
 * Example: interpolationError((x) => x * x, Float64Array.of(0, 1), Float64Array.of(0, 1)) -> { maxError: 0.25, at: 0.5 }.
 */
export function interpolationError(value: (x: number) => number, nodeX: Float64Array, nodeY: Float64Array, stopAbove = Infinity): InterpolationError {
  const k = SAMPLES_PER_INTERVAL;
  const gaps = new Float64Array(k + 1);
  let maxError = 0;
  let at = nodeX.length > 0 ? (nodeX[0] as number) : NaN;
  for (let i = 0; i + 1 < nodeX.length; i++) {
    const x0 = nodeX[i] as number;
    const x1 = nodeX[i + 1] as number;
    const y0 = nodeY[i] as number;
    const y1 = nodeY[i + 1] as number;
    const h = x1 - x0;
    if (!(h > 0)) continue;
    const slope = (y1 - y0) / h;
    for (let j = 0; j <= k; j++) gaps[j] = gapAt(value, j === k ? x1 : x0 + (h * j) / k, x0, y0, slope);
    for (let j = 0; j <= k; j++) {
      const g = gaps[j] as number;
      if (g > maxError) {
        maxError = g;
        at = j === k ? x1 : x0 + (h * j) / k;
      }
      // Refine interior local maxima within a tenth of the interval's best sample.
      if (j === 0 || j === k || g < (gaps[j - 1] as number) || g < (gaps[j + 1] as number)) continue;
      let a = x0 + (h * (j - 1)) / k;
      let b = x0 + (h * (j + 1)) / k;
      let c = b - INV_PHI * (b - a);
      let d = a + INV_PHI * (b - a);
      let gc = gapAt(value, c, x0, y0, slope);
      let gd = gapAt(value, d, x0, y0, slope);
      for (let s = 0; s < REFINE_STEPS; s++) {
        if (gc >= gd) {
          b = d;
          d = c;
          gd = gc;
          c = b - INV_PHI * (b - a);
          gc = gapAt(value, c, x0, y0, slope);
        } else {
          a = c;
          c = d;
          gc = gd;
          d = a + INV_PHI * (b - a);
          gd = gapAt(value, d, x0, y0, slope);
        }
      }
      const best = Math.max(gc, gd);
      if (best > maxError) {
        maxError = best;
        at = gc >= gd ? c : d;
      }
    }
    if (maxError > stopAbove) break;
  }
  return { maxError, at };
}
