/**
 * The surface record's format name and version, and the suffixes of a surface fit's files.
 * No imports, so the ownership rule (core/outputs/ownership.ts) and `check` can read them.
 */

/** Format name of the surface record. */
export const SURFACE_RECORD_FORMAT = 'knotwise-surface-record';
/** Version of the surface record; raised when a key changes meaning, goes away or is added. */
export const SURFACE_RECORD_VERSION = 1;
/** Suffixes of a surface fit's files after the data file's stem. */
export const SURFACE_SUFFIX = { table: '.surface.csv', record: '.surface.fit.json', report: '.surface.report.md', figure: '.surface.heat.svg' } as const;
