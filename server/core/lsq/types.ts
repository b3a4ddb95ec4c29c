/**
 * Contract between a model and the least-squares engine.
 * The engine minimises ½·Σ r_i(p)² subject to lower ≤ p ≤ upper.
 */
export interface LeastSquaresProblem {
  /** Number of residuals (observations). */
  readonly m: number;
  /** Number of free parameters. */
  readonly n: number;
  /**
   * Fill r (length m) with residuals at p; when J is given also fill it, row-major m×n,
   * J[i*n + j] = ∂r_i/∂p_j. Returning false means p is outside the model's domain
   * (e.g. a drained-dry state): the engine treats it as a rejected step.
   */
  evaluate(p: Float64Array, r: Float64Array, J: Float64Array | null): boolean | void;
  readonly lower?: Float64Array;
  readonly upper?: Float64Array;
}

export type StopReason =
  | 'relative-reduction' // ftol: actual and predicted relative reductions of the sum of squares are small
  | 'relative-step' // xtol: relative change of the scaled parameters is small
  | 'gradient-orthogonal' // gtol: residuals orthogonal to the Jacobian columns
  | 'zero-residual'
  | 'max-iterations'
  | 'max-evaluations'
  | 'not-finite'
  | 'no-progress';

export interface SolveOptions {
  maxIterations?: number;
  maxEvaluations?: number;
  ftol?: number;
  xtol?: number;
  gtol?: number;
  /** Initial trust-region radius factor (MINPACK's `factor`). */
  stepBound?: number;
  /**
   * When only the minimum's sum of squares is wanted (profile refits), skip the Jacobian, QR and
   * SVD at the solution: unscaledCovariance and singularValues are then NaN, rank 0, and jacobian
   * is the one of the last iteration.
   */
  skipCovariance?: boolean;
}

export interface SolveResult {
  p: Float64Array;
  /** Residuals at p (length m). */
  residuals: Float64Array;
  /** Σ r_i² at p. */
  sumSquares: number;
  iterations: number;
  evaluations: number;
  jacobianEvaluations: number;
  stopReason: StopReason;
  converged: boolean;
  /** Numerical rank of J at p, and n. */
  rank: number;
  /** (JᵀJ)⁻¹ at p, row-major n×n, from the SVD of R (pseudo-inverse when rank-deficient). */
  unscaledCovariance: Float64Array;
  /** Jacobian at p, row-major m×n. */
  jacobian: Float64Array;
  /** Singular values of J at p, descending. */
  singularValues: Float64Array;
  /** Indices of parameters pinned at a bound at the solution. */
  atBound: number[];
}
