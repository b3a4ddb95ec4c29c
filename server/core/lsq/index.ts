export type { LeastSquaresProblem, SolveOptions, SolveResult, StopReason } from './types.js';
export {
  solveLeastSquares,
  createSolveWorkspace,
  DEFAULT_SOLVE_OPTIONS,
  type SolveWorkspace,
} from './levenberg-marquardt.js';
export { finiteDifferenceJacobian } from './finite-difference.js';
export { covarianceFromR, covarianceFromJacobian } from './covariance.js';
export { householderQr, applyQt, extractR } from './qr.js';
export { lmParameter } from './lmpar.js';
export { euclideanNorm } from './norm.js';
export { gatherColumns, sumOfSquares } from './passes.js';
