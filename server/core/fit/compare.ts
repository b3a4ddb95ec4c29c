import { fCdf } from '../stats/index.js';
import { THETA } from '../drain/parameters.js';
import { closedFormInflowSensitivity } from '../drain/closed-form.js';
import { predictReadings, solutionFor } from '../drain/predict.js';
import { applyQt, gatherColumns, householderQr, type SolveWorkspace } from '../lsq/index.js';
import type { UncertaintyModel } from './uncertainty.js';
import { describeTerms, type ModelTerms } from './terms.js';
import { fitVariant, type FittedVariant, type VariantInput } from './variant.js';

/**
 * Is each optional term earned? The chosen model is compared with the model that differs from it
 * by one term (removed when it is in, added when it is out). Both the F-test of the nested pair
 * and Akaike's criterion use the effective sample size of the chosen fit, so serially correlated
 * residuals do not make every extra term look significant.
 *
 * A term that is out of the chosen model is first judged by a score (Lagrange-multiplier) test:
 * one evaluation of the extended model's Jacobian at the chosen fit gives the fall of the sum of
 * squares that one Gauss–Newton step of the extended model would reach, with no refit. Only when
 * that says the term may be earned (p < 0.01 or ΔAIC < 0) is the extended model refitted in full,
 * so every row that could raise a warning carries the refitted numbers. A term that is in the
 * chosen model is always judged by refitting without it. Each row says which method it used.
 */
export const SCORE_TEST_METHOD =
  'score test: one Gauss–Newton step of the extended model from the chosen fit, no refit';
export const REFIT_METHOD = 'refit of the other model';

/** A score test at or below this p-value (or with ΔAIC < 0) is confirmed by a full refit. */
const CONFIRM_P = 0.01;

export interface ModelComparisonRow {
  term: keyof ModelTerms;
  /** 'with' when the row is the chosen model plus the term, 'without' when minus it. */
  change: 'with' | 'without';
  model: string;
  parameters: number;
  sumSquares: number;
  aic: number;
  /** AIC of this row minus AIC of the chosen model (negative: this row is preferred). */
  deltaAic: number;
  fTest: { f: number; dof1: number; dof2: number; pValue: number } | null;
  /** The refit's convergence; for a score-test row, the chosen fit's. */
  converged: boolean;
  /** How the row's sum of squares was found: SCORE_TEST_METHOD or REFIT_METHOD. */
  method: string;
}

export interface ModelComparison {
  chosen: { model: string; parameters: number; sumSquares: number; aic: number };
  rows: ModelComparisonRow[];
  basis: string;
}

const TERMS: (keyof ModelTerms)[] = ['inflow', 'datum', 'exponent'];
const TERM_INDEX: Record<keyof ModelTerms, number> = {
  inflow: THETA.inflow,
  datum: THETA.sensorZero,
  exponent: THETA.exponent,
};

/** Gaussian AIC with the log-likelihood counted over the effective samples: nEff·ln(SSR/m) + 2k. */
function aicAt(sumSquares: number, m: number, nEff: number, k: number): number {
  return nEff * Math.log(sumSquares / m) + 2 * k;
}

export function compareModels(
  input: VariantInput,
  best: FittedVariant,
  unc: UncertaintyModel,
  datumRequired: boolean,
  work?: SolveWorkspace,
): ModelComparison {
  const m = best.solve.residuals.length;
  const nEff = Math.max(unc.effectiveSamples, best.k + 2);
  const chosenAic = aicAt(best.solve.sumSquares, m, nEff, best.k);
  const rowFor = (
    term: keyof ModelTerms,
    terms: ModelTerms,
    k: number,
    sumSquares: number,
    converged: boolean,
    method: string,
  ): ModelComparisonRow => {
    const withTerm = terms[term];
    const small = withTerm ? best.solve.sumSquares : sumSquares;
    const large = withTerm ? sumSquares : best.solve.sumSquares;
    const kLarge = withTerm ? k : best.k;
    const dof1 = Math.abs(k - best.k);
    const dof2 = Math.max(nEff - kLarge, 1);
    const f = (small - large) / dof1 / (large / Math.max(m - kLarge, 1)) / unc.varianceInflation;
    const fTest = Number.isFinite(f)
      ? { f: Math.max(f, 0), dof1, dof2, pValue: 1 - fCdf(Math.max(f, 0), dof1, dof2) }
      : null;
    const aic = aicAt(sumSquares, m, nEff, k);
    return {
      term,
      change: withTerm ? 'with' : 'without',
      model: describeTerms(terms),
      parameters: k,
      sumSquares,
      aic,
      deltaAic: aic - chosenAic,
      fTest,
      converged,
      method,
    };
  };
  const refit = (term: keyof ModelTerms, terms: ModelTerms): ModelComparisonRow | null => {
    const start = Float64Array.from(best.theta);
    if (!terms.inflow) start[THETA.inflow] = 0;
    if (!terms.exponent) start[THETA.exponent] = 0.5;
    let v: FittedVariant;
    try {
      v = fitVariant(input, terms, start, undefined, { work, sumSquaresOnly: true });
    } catch {
      return null; // a variant that cannot be evaluated is simply not compared
    }
    return rowFor(term, terms, v.k, v.solve.sumSquares, v.solve.converged, REFIT_METHOD);
  };

  const added = TERMS.filter((term) => !best.terms[term]);
  const falls = added.length ? scoreFalls(input, best, added) : null;
  const rows: ModelComparisonRow[] = [];
  for (const term of TERMS) {
    if (term === 'datum' && datumRequired && best.terms.datum) continue; // cannot drop an unknown datum
    const terms: ModelTerms = { ...best.terms, [term]: !best.terms[term] };
    const fall = falls?.get(term);
    let row: ModelComparisonRow | null = null;
    if (fall !== undefined && Number.isFinite(fall)) {
      const score = rowFor(
        term,
        terms,
        best.k + 1,
        best.solve.sumSquares - fall,
        best.solve.converged,
        SCORE_TEST_METHOD,
      );
      const mayBeEarned = !score.fTest || score.fTest.pValue <= CONFIRM_P || score.deltaAic < 0;
      row = mayBeEarned ? refit(term, terms) : score;
    } else row = refit(term, terms);
    if (row) rows.push(row);
  }
  return {
    chosen: {
      model: describeTerms(best.terms),
      parameters: best.k,
      sumSquares: best.solve.sumSquares,
      aic: chosenAic,
    },
    rows,
    basis: `F-test of nested pairs and AIC, both at the effective sample size ${nEff.toFixed(0)} of ${m}`,
  };
}

/**
 * For each added term, the fall of the sum of squares one Gauss–Newton step of the extended model
 * takes from the chosen fit: ‖P·r‖² with P the projection onto the extended Jacobian's columns.
 * One model evaluation gives every added term's column; the chosen model's columns are factored
 * once (Householder QR), and each added column's part g⊥ orthogonal to them gives its term's fall
 * ‖P_k·r‖² + (g⊥ᵀr)²/‖g⊥‖², without forming a normal matrix. Missing when the extension cannot be
 * evaluated (the caller then refits).
 */
function scoreFalls(
  input: VariantInput,
  best: FittedVariant,
  added: (keyof ModelTerms)[],
): Map<keyof ModelTerms, number> {
  const { setting, timeS } = input;
  const m = timeS.length;
  const k = best.k;
  const all: ModelTerms = { ...best.terms };
  for (const term of added) all[term] = true;
  // the chosen model's columns first, in its own order, then one column per added term
  const extra = added.map((term) => TERM_INDEX[term]);
  const free = Int32Array.from([...best.free, ...extra]);
  const w = free.length;
  const model = new Float64Array(m);
  const J = new Float64Array(m * w);
  const out = new Map<keyof ModelTerms, number>();
  // A constant-area orifice fit keeps its closed form: the inflow column then comes from the
  // closed-form sensitivity (the closed form itself leaves it 0), not from integrating the ODE.
  const inflowCol = extra.indexOf(THETA.inflow);
  const closed =
    best.solution === 'closed-form' &&
    best.theta[THETA.exponent] === 0.5 &&
    best.theta[THETA.inflow] === 0;
  let ok: boolean;
  if (closed) {
    ok = predictReadings(setting, 'closed-form', best.theta, timeS, model, J, free);
    if (ok && inflowCol >= 0)
      ok = closedFormInflowSensitivity(setting, best.theta, timeS, J, w, k + inflowCol);
  } else ok = false;
  if (!ok)
    ok = predictReadings(
      setting,
      solutionFor(setting, all.inflow),
      best.theta,
      timeS,
      model,
      J,
      free,
    );
  if (!ok) return out;
  const a = new Float64Array(m * k);
  gatherColumns(J, m, w, null, k, a);
  const qr = {
    ipvt: new Int32Array(k),
    rdiag: new Float64Array(k),
    acnorm: new Float64Array(k),
    wa: new Float64Array(k),
  };
  householderQr(a, m, k, true, qr);
  const qtr = new Float64Array(m);
  const head = new Float64Array(k);
  applyQt(a, m, k, best.solve.residuals, qtr, head);
  let inSpan = 0; // ‖(Qᵀr)₁..ₖ‖²: zero at an exact optimum, kept so the step is the exact Gauss–Newton one
  for (let i = 0; i < k; i++) inSpan += qtr[i] * qtr[i];
  const g = new Float64Array(m);
  const qtg = new Float64Array(m);
  for (let e = 0; e < added.length; e++) {
    const c = k + e;
    gatherColumns(J, m, w, Int32Array.of(c), 1, g);
    applyQt(a, m, k, g, qtg, head);
    const [gg, gr] = tailDots(qtg, qtr, k);
    out.set(added[e], gg > 0 && Number.isFinite(gr) ? inSpan + (gr * gr) / gg : NaN);
  }
  return out;
}

/** [Σ x_i², Σ x_i·y_i] over i ≥ from (a separate small function so the JIT takes it up early). */
function tailDots(x: Float64Array, y: Float64Array, from: number): [number, number] {
  let xx = 0;
  let xy = 0;
  for (let i = from; i < x.length; i++) {
    xx += x[i] * x[i];
    xy += x[i] * y[i];
  }
  return [xx, xy];
}
