/**
 * The one formatting module: every number a person reads (the CLI's text, the workbench through
 * web/src/format.ts, the PDFs through server/render/report-format.ts) is written here. Pure.
 * Defaults: SI (mm², L/s, m); expanded uncertainties to two significant digits with the value
 * rounded to match (JCGM 100:2008 §7.2.6); plain values to 4 significant digits, trailing zeros
 * kept; no exponent between 1e-6 and 1e9; durations over 90 days in months or years.
 * JSON is never formatted: it stays SI.
 */
export * from './nist-factors.js';
export * from './unit-system.js';
export * from './digits.js';
export * from './uncertainty.js';
export * from './quantity.js';
export * from './duration.js';
export * from './words.js';
