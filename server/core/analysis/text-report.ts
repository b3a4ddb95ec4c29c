import type { FitJson } from '../analysis-contract.js';
import {
  correlationLines,
  pad,
  parameterLines,
  SAFETY_LINES,
  solverLine,
  warningLines,
} from '../fit-result/text.js';
import { sig, toU } from '../format/digits.js';
import { lengthText, smallLengthText } from '../format/quantity.js';
import { measurementText, uncertaintyText } from '../format/uncertainty.js';
import {
  DEFAULT_UNIT_SYSTEM,
  displayUnit,
  UNIT_SYSTEM_WORDS,
  type UnitSystem,
} from '../format/unit-system.js';
import { autocorrelationText, budgetTableOf } from '../budget/table.js';

/**
 * The readable fit report printed by `efflux fit` (and reused by the service): everything a
 * reviewer needs to judge the fit, from the JSON result alone so both always agree.
 */
type Quantity = {
  value: number;
  standardUncertainty: number;
  ci95: [number, number];
  coverageFactor?: number;
  expandedUncertainty?: number;
  effectiveDegreesOfFreedom?: number;
};

export interface TextReportOptions {
  /** The units a person reads (core/format): SI by default; the JSON stays SI either way. */
  units?: UnitSystem;
}

export function textReport(fit: FitJson, opts: TextReportOptions = {}): string {
  const units = opts.units ?? DEFAULT_UNIT_SYSTEM;
  const f = fit as FitJson & Record<string, any>;
  const lines: string[] = [];
  const rule = '─'.repeat(72);
  // An unconverged fit has numbers but no result: say so before anything a reader could quote.
  const unconverged = f.converged === false;
  if (unconverged) {
    lines.push(
      `FIT DID NOT CONVERGE (solver: ${f.solver?.stopReason ?? 'stopped'}): do not use any number in this report.`,
    );
    lines.push(
      'Try a longer window, fewer fitted terms (--fit-inflow, --fit-datum, --fit-exponent) or a vessel file that gives the sensor zero.',
    );
  }
  // A converged fit that says little about Cd is flagged before anything a reader could quote.
  const wide = (f.warnings ?? []).find(
    (x: { code: string }) => x.code === 'interval-wider-than-value',
  );
  if (wide && !unconverged) lines.push(`UNCERTAIN FIT: ${wide.message}.`);
  lines.push(`Drain test fit — ${f.vessel?.name ?? 'vessel'} (${f.vessel?.shape?.kind ?? ''})`);
  lines.push(rule);
  if (unconverged) {
    lines.push(
      "Discharge coefficient  Cd    = NOT CONVERGED (the solver's last values below are for diagnosis only)",
    );
    lines.push('Effective area         Cd·a  = NOT CONVERGED');
  } else headline(lines, f, units);
  lines.push('');
  const w = f.window as Record<string, any>;
  lines.push(
    `Window   ${sig(w.startS, 6)} s … ${sig(w.endS, 6)} s from the log's start, ${w.samples} samples` +
      (w.startTime ? ` (${w.startTime} … ${w.endTime})` : '') +
      (w.chosenBy ? `, chosen ${w.chosenBy}` : ''),
  );
  for (const t of (w.trims ?? []) as { reason: string }[])
    lines.push(`         trimmed: ${t.reason}`);
  if (w.excludedSamples)
    lines.push(
      `         ${w.excludedSamples} samples inside the window left out (spikes or flat lines)`,
    );
  lines.push(`Model    ${f.model?.equation ?? ''}`);
  lines.push(`         free: ${f.model?.description ?? ''}; solution: ${f.model?.solution ?? ''}`);
  lines.push('');
  lines.push(...parameterLines(f.parameters ?? [], 22, units));
  lines.push(...correlationLines(f.correlations));
  const r = f.residuals;
  const um = f.uncertaintyMethod;
  lines.push('');
  lines.push(
    `Residuals  RMSE ${smallLengthText(r?.rmseM, undefined, units)}, max |r| ${smallLengthText(r?.maxAbsM, undefined, units)}, lag-1 autocorrelation ${sig(r?.lag1Autocorrelation, 3)}, Durbin–Watson ${sig(r?.durbinWatson, 3)}`,
  );
  if (um) {
    lines.push(
      `Uncertainty  ${um.covariance}; correction: ${um.autocorrelationCorrection} (${autocorrelationText(um.lag1Autocorrelation, um.varianceInflation)}, ${sig(um.effectiveSamples, 4)} effective of ${um.samples} samples, ν = ${sig(um.degreesOfFreedom, 4)}, t = ${sig(um.coverageFactor, 4)})`,
    );
  }
  const budget = f.budget as
    | {
        table?: { columns: string[]; rows: string[][]; totals: [string, string][] };
        notes?: string[];
      }
    | undefined;
  if (budget?.table) {
    lines.push('');
    lines.push('Uncertainty budget (JCGM 100:2008)');
    lines.push(
      ...budgetTableText(budgetTableOf(budget as Parameters<typeof budgetTableOf>[0], units)),
    );
    for (const n of budget.notes ?? []) lines.push(`  · ${n}`);
  }
  const cmp = f.modelComparison;
  if (cmp && cmp.rows?.length) {
    lines.push('');
    lines.push(`Model comparison (${cmp.basis})`);
    lines.push(
      `  chosen: ${cmp.chosen.model}  SSR ${sig(cmp.chosen.sumSquares)} m², AIC ${sig(cmp.chosen.aic, 6)}`,
    );
    for (const row of cmp.rows as any[]) {
      const ft = row.fTest
        ? `F = ${sig(row.fTest.f, 3)}, p = ${sig(row.fTest.pValue, 2)}`
        : 'F-test —';
      lines.push(
        `  ${pad(`${row.change} ${row.term}:`, 16)}SSR ${sig(row.sumSquares)} m², ΔAIC ${sig(row.deltaAic, 3)}, ${ft}${row.method ? ` (${row.method})` : ''}`,
      );
    }
  }
  const bands = f.headBands as any[] | undefined;
  if (bands?.length) {
    lines.push('');
    lines.push(
      "Cd by head band (u: standard uncertainty of the band's fit, AR(1)-corrected like the whole fit; bore tolerance not included, so bands compare with each other)",
    );
    for (const b of bands)
      lines.push(
        `  head ${lengthText(b.headFromM, undefined, units)} → ${lengthText(b.headToM, undefined, units)}: Cd = ${toU(b.dischargeCoefficient, b.standardUncertainty)}   u = ${sig(b.standardUncertainty, 2)} (${b.samples} samples)`,
      );
  }
  lines.push('');
  lines.push(solverLine(f.solver, f.converged));
  lines.push('');
  lines.push(...warningLines(f.warnings));
  lines.push(rule);
  lines.push(
    `Units: ${UNIT_SYSTEM_WORDS[units]}; expanded uncertainties U to two significant digits (JCGM 100:2008, 7.2.6).`,
  );
  lines.push(...SAFETY_LINES);
  return lines.join('\n') + '\n';
}

/** The Cd and Cd·a lines of a converged fit: value ± U (JCGM 100 §7.2.6 digits), then k and u. */
function headline(lines: string[], f: FitJson & Record<string, any>, units: UnitSystem): void {
  const cd = f.dischargeCoefficient as Quantity & Record<string, number>;
  const ea = f.effectiveAreaM2 as Quantity & { profileCi95?: [number, number] | null };
  if (cd) {
    const u = cd.standardUncertainty;
    lines.push(
      `Discharge coefficient  Cd    = ${measurementText(cd.value, cd.expandedUncertainty ?? null)}   (U, k = ${sig(cd.coverageFactor, 3)}, about 95 %; u = ${uncertaintyText(u)})`,
    );
    lines.push(
      `                       95 % interval ${toU(cd.ci95[0], u)} … ${toU(cd.ci95[1], u)}   (bore d = ${smallLengthText(f.outlet?.boreM, undefined, units)}, ν_eff = ${(cd.effectiveDegreesOfFreedom ?? 0) >= 1e6 ? '∞, stated limits dominate' : sig(cd.effectiveDegreesOfFreedom, 3)})`,
    );
  }
  const { perSi, symbol } = displayUnit('area', units);
  const ue = ea.standardUncertainty * perSi;
  const area = (m2: number) => toU(m2 * perSi, ue);
  lines.push(
    `Effective area         Cd·a  = ${measurementText(ea.value * perSi, ea.expandedUncertainty === undefined ? null : ea.expandedUncertainty * perSi, symbol)}   (U, k = ${sig(ea.coverageFactor, 3)}; u = ${uncertaintyText(ue, symbol)})`,
  );
  lines.push(
    `                       95 % interval ${area(ea.ci95[0])} … ${area(ea.ci95[1])} ${symbol}` +
      (ea.profileCi95
        ? `   profile: ${area(ea.profileCi95[0])} … ${area(ea.profileCi95[1])} ${symbol}`
        : ''),
  );
}

/** The budget table in fixed-width columns (the strings come from the fit JSON). */
export function budgetTableText(t: {
  columns: string[];
  rows: string[][];
  totals: [string, string][];
}): string[] {
  const widths = t.columns.map((c, j) => Math.max(c.length, ...t.rows.map((r) => r[j].length)));
  const row = (cells: string[]) =>
    '  ' +
    cells
      .map((c, j) => pad(c, widths[j] + 2))
      .join('')
      .trimEnd();
  return [row(t.columns), ...t.rows.map(row), ...t.totals.map(([k, v]) => `  ${pad(k, 6)}${v}`)];
}
