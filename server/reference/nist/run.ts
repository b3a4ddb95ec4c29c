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
import type { Dd } from './double-double.js';
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
  const rel =
    certified === 0 ? Math.abs(estimate) : Math.abs(estimate - certified) / Math.abs(certified);
  if (rel === 0) return digits;
  return Math.max(0, Math.min(digits, -Math.log10(rel)));
}

/** One dataset's data as the residual loops read them. */
interface StrdData {
  model: StrdModel;
  m: number;
  n: number;
  y: Float64Array;
  x1: Float64Array;
  x2: Float64Array;
  yDd: readonly Dd[];
  x1Dd: readonly Dd[];
  x2Dd: readonly Dd[];
  g: Float64Array;
}

// The loops are module-level functions, not closures made per problem: V8 keeps their optimised
// code from one run to the next, where a fresh closure per run would start cold each time.

function residualsDd(d: StrdData, p: Float64Array, r: Float64Array): void {
  for (let i = 0; i < d.m; i++)
    r[i] = toNumber(sub(d.yDd[i], d.model.fDd(p, d.x1Dd[i], d.x2Dd[i])));
}

/** Jacobian rows from the double model; also the residuals when `withResiduals`. */
function doubleModel(
  d: StrdData,
  p: Float64Array,
  r: Float64Array,
  J: Float64Array | null,
  withResiduals: boolean,
): void {
  const { n, g } = d;
  for (let i = 0; i < d.m; i++) {
    const f = d.model.f(p, d.x1[i], d.x2[i], J ? g : null);
    if (withResiduals) r[i] = d.y[i] - f;
    if (J) for (let k = 0; k < n; k++) J[i * n + k] = -g[k];
  }
}

function samePoint(a: Float64Array, b: Float64Array): boolean {
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

/**
 * The least-squares problem of one dataset. Residuals r_i = y_i − f(x_i; b) are formed in
 * double-double from the decimal data and rounded once to double (`residuals: 'double-double'`,
 * the default), or entirely in double from the rounded data (`'double'`, kept to compare); the
 * Jacobian is always the double analytic one.
 */
export function strdProblem(
  ds: StrdDataset,
  model: StrdModel,
  residuals: 'double-double' | 'double' = 'double-double',
): LeastSquaresProblem {
  const respDd = model.responseDd;
  const data: StrdData = {
    model,
    m: ds.y.length,
    n: model.n,
    y: model.response ? ds.y.map(model.response) : ds.y,
    x1: ds.x[0],
    x2: ds.x[1] ?? ds.x[0],
    yDd: respDd ? ds.yExact.map((v) => respDd(v)) : ds.yExact,
    x1Dd: ds.xExact[0],
    x2Dd: ds.xExact[1] ?? ds.xExact[0],
    g: new Float64Array(model.n),
  };
  const exact = residuals === 'double-double';
  // The engine asks for the Jacobian at the point it has just accepted, whose residuals it computed
  // as a trial a moment before: keep the last point's double-double residuals rather than redo them.
  const lastP = new Float64Array(model.n).fill(NaN);
  const lastR = new Float64Array(data.m);
  return {
    m: data.m,
    n: data.n,
    evaluate(p, r, J) {
      if (!exact) return doubleModel(data, p, r, J, true);
      if (samePoint(p, lastP)) r.set(lastR);
      else {
        residualsDd(data, p, r);
        lastP.set(p);
        lastR.set(r);
      }
      if (J) doubleModel(data, p, r, J, false);
    },
  };
}

export function runStrd(ds: StrdDataset, start: 1 | 2, options?: SolveOptions): StrdRun {
  const model = STRD_MODELS[ds.name];
  if (!model) throw new InputError(`no model for dataset ${ds.name}`, { field: 'dataset' });
  if (model.n !== ds.parameters.length) {
    throw new InputError(
      `${ds.name} lists ${ds.parameters.length} parameters, the model has ${model.n}`,
    );
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
  const se = Array.from({ length: problem.n }, (_, k) =>
    Math.sqrt(s2 * res.unscaledCovariance[k * problem.n + k]),
  );
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
    estimateLre: ds.parameters.map((q, k) =>
      logRelativeError(res.p[k], q.certified, q.certifiedDigits),
    ),
    standardErrorLre: ds.parameters.map((q, k) =>
      logRelativeError(se[k], q.certifiedSd, q.certifiedSdDigits),
    ),
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
  for (const ds of datasets)
    for (const start of [1, 2] as const) out.push(runStrd(ds, start, options));
  return out;
}
