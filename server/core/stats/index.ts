export { tQuantile, fCdf } from './distributions.js';
export { residualDiagnostics, type ResidualDiagnostics } from './residuals.js';
export { akaike, nestedFTest } from './model-choice.js';
