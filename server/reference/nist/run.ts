/**
 * Fit one StRD dataset from one of its starts with the engine and score it against the
 * certified values by the log relative error.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../core/errors.js';
import { solveLeastSquares } from '../../core/lsq/index.js';
import type { LeastSquaresProblem, SolveOptions, SolveResult } from '../../core/lsq/index.js';
import { sub, toNumber } from './double-double.js';
import { STRD_MODELS } from './models.js';
import type { StrdModel } from './models.js';
import { parseStrdFile } from './strd-file.js';
import type { StrdDataset } from './strd-file.js';

export interface StrdRun {
  dataset: string;
  start: 1 | 2;
  estimates: number[];
  standardErrors: number[];
  residualSumOfSquares: number;
  converged: boolean;
  stopReason: string;
  iterations: number;
  ms: number;
  /** LRE per estimate and per standard error, and of the residual sum of squares. */
  estimateLre: number[];
  standardErrorLre: number[];
  rssLre: number;
}

/** −log10(|est − cert| / |cert|), capped at `digits`; 0 when not even the first digit agrees. */
export function logRelativeError(estimate: number, certified: number, digits: number): number {
  if (!Number.isFinite(estimate)) return 0;
  const rel = certified === 0 ? Math.abs(estimate) : Math.abs(estimate - certified) / Math.abs(certified);
  if (rel === 0) return digits;
  return Math.max(0, Math.min(digits, -Math.log10(rel)));
}

/**
 * The least-squares problem of one dataset. Residuals r_i = y_i − f(x_i; b) are formed in
 * double-double from the decimal data and rounded once to double (`residuals: 'double-double'`,
 * the default), or entirely in double from the rounded data (`'double'`, kept to compare); the
 * Jacobian is always the double analytic one.
 */
export function strdProblem(ds: StrdDataset, model: StrdModel, residuals: 'double-double' | 'double' = 'double-double'): LeastSquaresProblem {
  const m = ds.y.length;
  const n = model.n;
  const y = model.response ? ds.y.map(model.response) : ds.y;
  const x1 = ds.x[0];
  const x2 = ds.x[1] ?? ds.x[0];
  const respDd = model.responseDd;
  const yDd = respDd ? ds.yExact.map((v) => respDd(v)) : ds.yExact;
  const x1Dd = ds.xExact[0];
  const x2Dd = ds.xExact[1] ?? ds.xExact[0];
  const exact = residuals === 'double-double';
  const g = new Float64Array(n);
  return {
    m,
    n,
    evaluate(p, r, J) {
      for (let i = 0; i < m; i++) {
        if (exact) r[i] = toNumber(sub(yDd[i], model.fDd(p, x1Dd[i], x2Dd[i])));
        if (J || !exact) {
          const f = model.f(p, x1[i], x2[i], J ? g : null);
          if (!exact) r[i] = y[i] - f;
          if (J) for (let k = 0; k < n; k++) J[i * n + k] = -g[k];
        }
      }
    },
  };
}

export function runStrd(ds: StrdDataset, start: 1 | 2, options?: SolveOptions): StrdRun {
  const model = STRD_MODELS[ds.name];
  if (!model) throw new InputError(`no model for dataset ${ds.name}`, { field: 'dataset' });
  if (model.n !== ds.parameters.length) {
    throw new InputError(`${ds.name} lists ${ds.parameters.length} parameters, the model has ${model.n}`);
  }
  const problem = strdProblem(ds, model);
  const p0 = Float64Array.from(ds.parameters, (q) => (start === 1 ? q.start1 : q.start2));
  const t0 = performance.now();
  const res: SolveResult = solveLeastSquares(problem, p0, options);
  const ms = performance.now() - t0;
  // SSR from the returned residuals (each already accurate to a double's rounding).
  let ssr = 0;
  for (const r of res.residuals) ssr += r * r;
  const s2 = ssr / (problem.m - problem.n);
  const se = Array.from({ length: problem.n }, (_, k) => Math.sqrt(s2 * res.unscaledCovariance[k * problem.n + k]));
  return {
    dataset: ds.name,
    start,
    estimates: Array.from(res.p),
    standardErrors: se,
    residualSumOfSquares: ssr,
    converged: res.converged,
    stopReason: res.stopReason,
    iterations: res.iterations,
    ms,
    estimateLre: ds.parameters.map((q, k) => logRelativeError(res.p[k], q.certified, q.certifiedDigits)),
    standardErrorLre: ds.parameters.map((q, k) => logRelativeError(se[k], q.certifiedSd, q.certifiedSdDigits)),
    rssLre: logRelativeError(ssr, ds.residualSumOfSquares, ds.residualSumOfSquaresDigits),
  };
}

/** Every .dat file in dir, by name. */
export function loadStrdDirectory(dir: string): StrdDataset[] {
  let names: string[];
  try {
    names = readdirSync(dir).filter((f) => f.toLowerCase().endsWith('.dat'));
  } catch {
    throw new InputError(`cannot read the StRD folder ${dir}`);
  }
  if (names.length === 0) throw new InputError(`no .dat files in ${dir}`);
  return names.sort().map((f) => parseStrdFile(readFileSync(join(dir, f), 'latin1'), f));
}

export function runAllStrd(datasets: StrdDataset[], options?: SolveOptions): StrdRun[] {
  const out: StrdRun[] = [];
  for (const ds of datasets) for (const start of [1, 2] as const) out.push(runStrd(ds, start, options));
  return out;
}
