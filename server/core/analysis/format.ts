/** Kept for the modules that import it here: the formatting lives in core/format. */
export { sig, toU } from '../format/digits.js';
