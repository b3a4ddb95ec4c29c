import { plainText, sig, toU } from '../format/digits.js';
import { uncertaintyText } from '../format/uncertainty.js';
import {
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  quantityOfSiUnit,
  type UnitSystem,
} from '../format/unit-system.js';
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

const unitText = (u: string) => (u === '1' || u === '' ? '' : ` ${u}`);

/** An SI unit as the person reads it: m² → mm² or in², m → m or ft (core/format). */
function shown(unit: string, units: UnitSystem): { symbol: string; perSi: number } {
  const q = quantityOfSiUnit(unit);
  return q ? displayUnit(q, units) : { symbol: unit, perSi: 1 };
}

/**
 * The table in the person's units (default SI: Cd·a in mm², lengths in m), without exponents for
 * ordinary magnitudes. Made once in SI when the fit is stored; the CLI and the workbench make it
 * again from the stored lines in the reader's units (budgetTableOf).
 */
export function budgetTable(
  lines: readonly BudgetLine[],
  cd: CombinedQuantity,
  effectiveArea: CombinedQuantity,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): BudgetTable {
  const rows = lines.map((l) => {
    const { symbol, perSi } = shown(l.unit, units);
    return [
      l.input +
        (l.source === 'assumed' ? ' (assumed)' : l.source === 'not stated' ? ' (not stated)' : ''),
      `${plainText(l.value * perSi, 6)}${unitText(symbol)}`,
      `${uncertaintyText(l.standardUncertainty * perSi)}${unitText(symbol)}`,
      l.distribution,
      `${plainText(l.sensitivity / perSi, 4)}${symbol === '1' || symbol === '' ? '' : ` per ${symbol}`}`,
      uncertaintyText(l.contribution),
      l.counted ? `${(l.share * 100).toFixed(1)} %` : 'in type A',
    ];
  });
  const nu = (q: CombinedQuantity) =>
    q.effectiveDegreesOfFreedom >= 1e6 ? '∞' : sig(q.effectiveDegreesOfFreedom, 3);
  const area = displayUnit('area', units);
  const a = (x: number) => x * area.perSi;
  const totals: Array<[string, string]> = [
    [
      'Cd',
      `${toU(cd.value, cd.combinedStandardUncertainty)}; u_c = ${uncertaintyText(cd.combinedStandardUncertainty)} (${sig(cd.relativeStandardUncertainty * 100, 2)} %); ν_eff = ${nu(cd)}; k = ${sig(cd.coverageFactor, 3)}; U = ${uncertaintyText(cd.expandedUncertainty)}`,
    ],
    [
      'Cd·a',
      `${toU(a(effectiveArea.value), a(effectiveArea.combinedStandardUncertainty))} ${area.symbol}; u_c = ${uncertaintyText(a(effectiveArea.combinedStandardUncertainty), area.symbol)} (${sig(effectiveArea.relativeStandardUncertainty * 100, 2)} %); ν_eff = ${nu(effectiveArea)}; k = ${sig(effectiveArea.coverageFactor, 3)}; U = ${uncertaintyText(a(effectiveArea.expandedUncertainty), area.symbol)}`,
    ],
  ];
  return { columns: BUDGET_COLUMNS, rows, totals };
}

/**
 * The table of a stored budget in the reader's units: made again from its lines when the fit JSON
 * has them, else the stored strings as they are (fits stored before the lines existed).
 */
export function budgetTableOf(
  budget: {
    table: BudgetTable;
    lines?: readonly unknown[];
    dischargeCoefficient?: unknown;
    effectiveAreaM2?: unknown;
  },
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): BudgetTable {
  const full =
    Array.isArray(budget.lines) &&
    budget.lines.every(
      (l) =>
        typeof (l as BudgetLine).value === 'number' &&
        typeof (l as BudgetLine).sensitivity === 'number',
    ) &&
    budget.dischargeCoefficient &&
    budget.effectiveAreaM2;
  return full
    ? budgetTable(
        budget.lines as BudgetLine[],
        budget.dischargeCoefficient as CombinedQuantity,
        budget.effectiveAreaM2 as CombinedQuantity,
        units,
      )
    : budget.table;
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
