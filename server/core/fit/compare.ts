import { fCdf } from '../stats/index.js';
import type { UncertaintyModel } from './uncertainty.js';
import { describeTerms, type ModelTerms } from './terms.js';
import { fitVariant, type FittedVariant, type VariantInput } from './variant.js';

/**
 * Is each optional term earned? The chosen model is compared with the model that differs from it
 * by one term (removed when it is in, added when it is out). Both the F-test of the nested pair
 * and Akaike's criterion use the effective sample size of the chosen fit, so serially correlated
 * residuals do not make every extra term look significant.
 */
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
  converged: boolean;
}

export interface ModelComparison {
  chosen: { model: string; parameters: number; sumSquares: number; aic: number };
  rows: ModelComparisonRow[];
  basis: string;
}

const TERMS: (keyof ModelTerms)[] = ['inflow', 'datum', 'exponent'];

/** Gaussian AIC with the log-likelihood counted over the effective samples: nEff·ln(SSR/m) + 2k. */
function aicAt(sumSquares: number, m: number, nEff: number, k: number): number {
  return nEff * Math.log(sumSquares / m) + 2 * k;
}

export function compareModels(
  input: VariantInput,
  best: FittedVariant,
  unc: UncertaintyModel,
  datumRequired: boolean,
): ModelComparison {
  const m = best.solve.residuals.length;
  const nEff = Math.max(unc.effectiveSamples, best.k + 2);
  const chosenAic = aicAt(best.solve.sumSquares, m, nEff, best.k);
  const rows: ModelComparisonRow[] = [];
  for (const term of TERMS) {
    if (term === 'datum' && datumRequired && best.terms.datum) continue; // cannot drop an unknown datum
    const terms: ModelTerms = { ...best.terms, [term]: !best.terms[term] };
    const start = Float64Array.from(best.theta);
    if (!terms.inflow) start[3] = 0;
    if (!terms.exponent) start[4] = 0.5;
    let v: FittedVariant;
    try {
      v = fitVariant(input, terms, start);
    } catch {
      continue; // a variant that cannot be evaluated is simply not compared
    }
    const small = terms[term] ? best : v;
    const large = terms[term] ? v : best;
    const dof1 = large.k - small.k;
    const dof2 = Math.max(nEff - large.k, 1);
    const f = ((small.solve.sumSquares - large.solve.sumSquares) / dof1 / (large.solve.sumSquares / Math.max(m - large.k, 1))) / unc.varianceInflation;
    const fTest = Number.isFinite(f) ? { f: Math.max(f, 0), dof1, dof2, pValue: 1 - fCdf(Math.max(f, 0), dof1, dof2) } : null;
    const aic = aicAt(v.solve.sumSquares, m, nEff, v.k);
    rows.push({
      term,
      change: terms[term] ? 'with' : 'without',
      model: describeTerms(terms),
      parameters: v.k,
      sumSquares: v.solve.sumSquares,
      aic,
      deltaAic: aic - chosenAic,
      fTest,
      converged: v.solve.converged,
    });
  }
  return {
    chosen: { model: describeTerms(best.terms), parameters: best.k, sumSquares: best.solve.sumSquares, aic: chosenAic },
    rows,
    basis: `F-test of nested pairs and AIC, both at the effective sample size ${nEff.toFixed(0)} of ${m}`,
  };
}
