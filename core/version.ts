/** Version of Knotwise, written into every fit record and generated file. */
export const VERSION = '0.1.0';
