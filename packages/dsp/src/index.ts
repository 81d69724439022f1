/** Earmark's analysis engine: pure signal processing over Float64Array, no I/O. */
export const ENGINE_VERSION = '0.1.0';

export * from './io/index.js';
export * from './stimulus/index.js';
