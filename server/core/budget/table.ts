import { sig, toU } from '../analysis/format.js';
import type { BudgetLine, CombinedQuantity } from './budget.js';

/**
 * The budget as a certificate-style table of strings, made once here and stored in the fit JSON,
 * so the CLI report, the fit page and the PDF print the same digits.
 */
export interface BudgetTable {
  columns: string[];
  rows: string[][];
  /** [label, text] pairs under the table: u_c, ν_eff, k, U for Cd and Cd·a. */
  totals: Array<[string, string]>;
}

export const BUDGET_COLUMNS = [
  'input',
  'value',
  'standard uncertainty u(x)',
  'distribution',
  'sensitivity c = ∂Cd/∂x',
  'contribution |c|·u(x)',
  'share',
];

const unitText = (u: string) => (u === '1' ? '' : ` ${u}`);

export function budgetTable(
  lines: readonly BudgetLine[],
  cd: CombinedQuantity,
  effectiveArea: CombinedQuantity,
): BudgetTable {
  const rows = lines.map((l) => [
    l.input +
      (l.source === 'assumed' ? ' (assumed)' : l.source === 'not stated' ? ' (not stated)' : ''),
    `${sig(l.value, 6)}${unitText(l.unit)}`,
    `${sig(l.standardUncertainty, 2)}${unitText(l.unit)}`,
    l.distribution,
    `${sig(l.sensitivity, 4)}${l.unit === '1' ? '' : ` per ${l.unit}`}`,
    sig(l.contribution, 2),
    l.counted ? `${(l.share * 100).toFixed(1)} %` : 'in type A',
  ]);
  const nu = (q: CombinedQuantity) =>
    q.effectiveDegreesOfFreedom >= 1e6 ? '∞' : sig(q.effectiveDegreesOfFreedom, 3);
  const totals: Array<[string, string]> = [
    [
      'Cd',
      `${toU(cd.value, cd.combinedStandardUncertainty)}; u_c = ${sig(cd.combinedStandardUncertainty, 2)} (${sig(cd.relativeStandardUncertainty * 100, 2)} %); ν_eff = ${nu(cd)}; k = ${sig(cd.coverageFactor, 3)}; U = ${sig(cd.expandedUncertainty, 2)}`,
    ],
    [
      'Cd·a',
      `${toU(effectiveArea.value, effectiveArea.combinedStandardUncertainty)} m²; u_c = ${sig(effectiveArea.combinedStandardUncertainty, 2)} m² (${sig(effectiveArea.relativeStandardUncertainty * 100, 2)} %); ν_eff = ${nu(effectiveArea)}; k = ${sig(effectiveArea.coverageFactor, 3)}; U = ${sig(effectiveArea.expandedUncertainty, 2)} m²`,
    ],
  ];
  return { columns: BUDGET_COLUMNS, rows, totals };
}

/** The autocorrelation correction in words, right for either sign of ρ. */
export function autocorrelationText(
  rho: number | null | undefined,
  inflation: number | null | undefined,
): string {
  if (rho === null || rho === undefined || !Number.isFinite(rho))
    return 'lag-1 autocorrelation unknown: no inflation applied';
  if (rho <= 0)
    return `lag-1 ρ = ${sig(rho, 3)} ≤ 0 (residuals not positively correlated): no inflation applied, variance × 1`;
  return `lag-1 ρ = ${sig(rho, 3)}: variance × ${sig(inflation, 4)} = (1+ρ)/(1−ρ)`;
}
