/** Version of Knotwise, written into every fit record and generated file. */
export const VERSION = '0.1.0';

/**
 * Version of the resampling arithmetic, written into every record (tool.resampling; a
 * record without it was written by version 1). Raised when the same data, spec and seed
 * would give other resampled errors: another random stream or draw order, or sums taken in
 * another order. `knotwise check` then says that the tool's resampling changed, not the data.
 */
export const RESAMPLING_VERSION = 3;

/** What each resampling version changed, for check's message. */
export const RESAMPLING_CHANGES: Readonly<Record<number, string>> = {
  2: "the mean absolute errors of the natural spline's resamples are summed cell by cell, which moves their last digits",
  3: 'the bootstrap draws x ranks instead of row indices, so each resample holds other rows (the same distribution) and the resampled errors change, and the rows are added in x order, which moves the last digits of every resampled error',
};
