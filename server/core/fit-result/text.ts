import { sig, toU } from '../format/digits.js';
import {
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  quantityOfSiUnit,
  type UnitSystem,
} from '../format/unit-system.js';
import { countText } from '../format/words.js';
import { uncertaintyText } from '../format/uncertainty.js';
import type { FitCorrelations, FitParameter, SolverRecord } from './schema.js';

/**
 * The sections every fit's text report shares, single vessel or joint, from the one fit-result
 * shape: the parameters table, the correlations, the solver's record, the warnings and the
 * safety line. `efflux fit` (analysis/text-report.ts) and `efflux fit-system` both print them.
 */
export const pad = (s: string, w: number) => (s.length >= w ? s : s + ' '.repeat(w - s.length));

const n = (x: number | null | undefined) => (typeof x === 'number' ? x : NaN);

/** The parameters table, each value in the person's units (areas mm²/in², flows L/s or gal/min, lengths m/ft). */
export function parameterLines(
  parameters: readonly FitParameter[],
  nameWidth = 22,
  units: UnitSystem = DEFAULT_UNIT_SYSTEM,
): string[] {
  const lines = [
    'Parameters',
    `  ${pad('name', nameWidth)}${pad('value', 14)}${pad('std. unc.', 12)}${pad('95 % interval', 30)}unit`,
  ];
  for (const p of parameters) {
    const q = quantityOfSiUnit(p.unit);
    const { perSi, symbol } = q ? displayUnit(q, units) : { perSi: 1, symbol: p.unit };
    const u = n(p.standardUncertainty) * perSi;
    const ci = p.ci95
      ? `${toU(n(p.ci95[0]) * perSi, u)} … ${toU(n(p.ci95[1]) * perSi, u)}`
      : 'fixed';
    const v = n(p.value) * perSi;
    lines.push(
      `  ${pad(p.name, nameWidth)}${pad(p.free ? toU(v, u) : sig(v, 6), 14)}${pad(p.free ? uncertaintyText(u) : '—', 12)}${pad(ci, 30)}${symbol}${p.atBound ? '  (at bound)' : ''}`,
    );
  }
  return lines;
}

export function correlationLines(corr: FitCorrelations | undefined): string[] {
  if (!corr || corr.parameters.length <= 1) return [];
  const lines = ['', 'Correlations'];
  for (let i = 0; i < corr.parameters.length; i++) {
    for (let j = i + 1; j < corr.parameters.length; j++) {
      const c = corr.matrix[i][j];
      lines.push(
        `  ${pad(`${corr.parameters[i]} ~ ${corr.parameters[j]}`, 46)}${c === null ? '—' : c.toFixed(4)}`,
      );
    }
  }
  return lines;
}

export function solverLine(s: SolverRecord | undefined, converged: boolean): string {
  return `Solver   ${s?.method}: ${s?.stopReason}, ${s?.iterations} iterations, ${s?.evaluations} evaluations, rank ${s?.rank}; converged: ${converged ? 'yes' : 'NO'}`;
}

export function warningLines(warnings: readonly { message: string }[]): string[] {
  if (!warnings.length) return ['Warnings: none'];
  return [
    countText(warnings.length, 'warning').replace(/^./, (c) => c.toUpperCase()),
    ...warnings.map((w) => `  ! ${w.message}`),
  ];
}

export const SAFETY_LINES = [
  'Engineering estimate with the stated uncertainty, not a certification. Drain tests involve work at',
  'height, confined spaces and discharges: follow site procedures, local codes and licensed engineering practice.',
];
