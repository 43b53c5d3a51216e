/**
 * Surfaces: a quantity of two inputs fitted by a tensor-product natural cubic regression
 * spline with a df per input (docs/design.md, "Surfaces"). The module's public face:
 *
 * - `fitSurface(data, { dfU, dfV })` -> SurfaceFit: fitted values, residuals, leverage,
 *   Cook's distance, residual SD, information criteria, exact leave-one-out RMSE, and
 *   `predict(u, v)` and `bands(us, vs, level)` at any points;
 * - `tuneSurface(data, options)`: the df pair chosen among candidates by the resampling
 *   schemes and rules of curves, with the error landscape and the words of the choice.
 */
export { axisBasis, sortedInput, type AxisBasis, type SortedInput } from './axis';
export { SurfaceBasis } from './basis';
export { prepareSurface, type PreparedSurface, type SurfaceData, type SurfaceNames } from './data';
export { fitSurface, fitSurfaceBasis, pairWords, SurfaceFunction, surfaceBasis, type SurfaceBands, type SurfaceFit, type SurfaceSpec } from './fit';
export { selectPair, simplerFirst, type SurfaceCandidate, type SurfaceMetric, type SurfaceRule, type SurfaceSelection } from './select';
export { DEFAULT_MAX_SURFACE_DF, MAX_SURFACE_PAIRS, ROW_ERROR_BUDGET, tuneSurface, type ErrorLandscape, type SurfaceTuneOptions, type SurfaceTuneResult } from './tune';
export { SurfaceResampler, type SurfaceEngine } from './resample';
export { landscapeLines } from './words';
