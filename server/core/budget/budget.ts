import { tQuantile } from '../stats/index.js';
import type { HeadBand } from '../fit/head-bands.js';
import { driftCheck, type DriftCheck } from './drift.js';
import { budgetInputs, type InputContext, type Source } from './inputs.js';
import {
  linearise,
  parameterSensitivity,
  type FittedModel,
  type Linearisation,
} from './sensitivity.js';
import { budgetTable, type BudgetTable } from './table.js';

/**
 * The uncertainty budget of Cd·a and Cd in the terms of JCGM 100:2008 (GUM): each input with its
 * estimate, standard uncertainty u(x_i), distribution and sensitivity coefficient c_i = ∂y/∂x_i;
 * contributions u_i(y) = |c_i|·u(x_i); u_c(y)² = Σ u_i(y)² (inputs independent, GUM 5.1.2);
 * Welch–Satterthwaite ν_eff = u_c⁴ / Σ u_i⁴/ν_i (GUM G.4.1) with ν = ∞ for the stated limits;
 * k = t_97.5%(ν_eff); U = k·u_c. The fit's own scatter is the type-A line (AR(1)-corrected,
 * widened when the drift check disagrees). Lines whose errors are already inside the fit's
 * scatter (the resolution) are shown with counted: false and not added twice.
 */
export interface BudgetLine {
  key: string;
  input: string;
  field: string | null;
  value: number;
  unit: string;
  standardUncertainty: number;
  distribution: string;
  degreesOfFreedom: number | null;
  source: Source | 'fit';
  note: string | null;
  /** ∂(Cd·a)/∂x, m² per unit of x. */
  sensitivityEffectiveArea: number;
  /** ∂Cd/∂x, per unit of x. */
  sensitivity: number;
  /** |∂Cd/∂x|·u(x). */
  contribution: number;
  contributionEffectiveArea: number;
  /** contribution² / u_c(Cd)² (share of the combined variance). */
  share: number;
  counted: boolean;
}

export interface CombinedQuantity {
  value: number;
  combinedStandardUncertainty: number;
  relativeStandardUncertainty: number;
  effectiveDegreesOfFreedom: number;
  coverageFactor: number;
  expandedUncertainty: number;
  ci95: [number, number];
}

export interface UncertaintyBudget {
  basis: string;
  lines: BudgetLine[];
  effectiveAreaM2: CombinedQuantity;
  dischargeCoefficient: CombinedQuantity;
  typeA: {
    standardUncertainty: number;
    ar1StandardUncertainty: number;
    degreesOfFreedom: number;
    drift: DriftCheck;
  };
  notes: string[];
  warnings: { code: string; message: string }[];
  /** The table as printed (same strings in the CLI report, the fit page and the PDF). */
  table: BudgetTable;
}

export interface BudgetRequest extends InputContext {
  model: FittedModel;
  boreM: number;
  /** AR(1)-corrected standard uncertainty of Cd·a from the fit, and its degrees of freedom. */
  typeAStandardUncertainty: number;
  typeADegreesOfFreedom: number;
  headBands: readonly HeadBand[];
}

const NU_CAP = 1e7;

export function uncertaintyBudget(req: BudgetRequest): UncertaintyBudget {
  const { model, boreM } = req;
  const nominal = (Math.PI * boreM * boreM) / 4;
  let lin: Linearisation | null = null;
  try {
    lin = linearise(model);
  } catch (e) {
    // θ̂ outside the model's domain (an unconverged fit): no coefficients, said in each line
    if (!(e instanceof RangeError)) throw e;
  }
  const cdA = model.theta[0];
  const cd = cdA / nominal;
  const drift: DriftCheck = lin
    ? driftCheck(lin, req.typeAStandardUncertainty ** 2, req.headBands)
    : {
        blocks: 0,
        jackknifeRatio: null,
        jackknifeLimit: null,
        headBandRatio: null,
        headBandLimit: null,
        varianceFactor: 1,
        degreesOfFreedom: null,
        reason: null,
      };
  const uA = req.typeAStandardUncertainty * Math.sqrt(drift.varianceFactor);
  const nuA = drift.degreesOfFreedom ?? req.typeADegreesOfFreedom;
  const lines: BudgetLine[] = [];
  lines.push({
    key: 'fit',
    input: 'fit scatter (type A)',
    field: null,
    value: cdA,
    unit: 'm²',
    standardUncertainty: uA,
    distribution: `Student-t, ν = ${Number(nuA.toPrecision(4))}`,
    degreesOfFreedom: nuA,
    source: 'fit',
    note: drift.reason
      ? 'AR(1)-corrected and widened for slow systematic effects (see the warning)'
      : 'AR(1)-corrected',
    sensitivityEffectiveArea: 1,
    sensitivity: 1 / nominal,
    contribution: uA / nominal,
    contributionEffectiveArea: uA,
    share: 0,
    counted: true,
  });
  for (const input of budgetInputs(req)) {
    let cA = 0;
    let cCd = 0;
    let counted = true;
    let note = input.note ?? null;
    if (input.effect.kind === 'bore') {
      cCd = (-2 * cd) / boreM;
    } else if (!lin) {
      cA = NaN;
      cCd = NaN;
      note =
        'sensitivity could not be computed: the fitted parameters are outside the model (the fit did not converge)';
    } else if (input.effect.kind === 'per-reading') {
      // independent per-reading errors: the effect on Cd·a is √((JᵀJ)⁻¹_aa) per unit u; inside type A
      cA =
        lin.areaColumn >= 0
          ? Math.sqrt(lin.inverseNormal[lin.areaColumn * lin.k + lin.areaColumn])
          : 0;
      cCd = cA / nominal;
      counted = false;
      note =
        note ?? 'independent per reading: already inside the fit scatter, shown, not added again';
    } else {
      try {
        const d = parameterSensitivity(model, lin, input);
        cA = lin.areaColumn >= 0 ? d[lin.areaColumn] : 0;
      } catch (e) {
        // the model left its domain when this input moved (e.g. a head near zero): say so, do not guess
        if (!(e instanceof RangeError)) throw e;
        cA = NaN;
        note = `sensitivity could not be computed (${e.message})`;
      }
      cCd = cA / nominal;
    }
    lines.push({
      key: input.key,
      input: input.input,
      field: input.field,
      value: input.value,
      unit: input.unit,
      standardUncertainty: input.standardUncertainty,
      distribution: input.distribution,
      degreesOfFreedom: null,
      source: input.source,
      note,
      sensitivityEffectiveArea: cA,
      sensitivity: cCd,
      contribution: input.standardUncertainty > 0 ? Math.abs(cCd) * input.standardUncertainty : 0,
      contributionEffectiveArea:
        input.standardUncertainty > 0 ? Math.abs(cA) * input.standardUncertainty : 0,
      share: 0,
      counted,
    });
  }
  const effectiveAreaM2 = combine(
    cdA,
    lines
      .filter((l) => l.counted && l.key !== 'outlet.boreM')
      .map((l) => [l.contributionEffectiveArea, l.degreesOfFreedom]),
  );
  const dischargeCoefficient = combine(
    cd,
    lines.filter((l) => l.counted).map((l) => [l.contribution, l.degreesOfFreedom]),
  );
  const uc2 = dischargeCoefficient.combinedStandardUncertainty ** 2;
  for (const l of lines) l.share = l.counted && uc2 > 0 ? l.contribution ** 2 / uc2 : 0;
  const notes = [
    'u(x): ± limits T read as rectangular, u = T/√3 (JCGM 100:2008, 4.3.7); resolution δ: u = δ/√12',
    'c = ∂Cd/∂x from the fitted model (linear response of the least-squares optimum); contribution = |c|·u(x); share = contribution²/u_c²',
    'u_c² = Σ contributions² (independent inputs); ν_eff by Welch–Satterthwaite with ν = ∞ for stated limits; k = t_97.5 %(ν_eff)',
  ];
  const unstated = lines.filter((l) => l.source === 'not stated').map((l) => l.field);
  if (unstated.length)
    notes.push(`not stated in the vessel file, counted as 0: ${[...new Set(unstated)].join(', ')}`);
  if (req.datumFitted)
    notes.push('the sensor zero is fitted: its uncertainty is inside the type-A line');
  const warnings = drift.reason ? [{ code: 'systematic-drift', message: drift.reason }] : [];
  return {
    basis: 'JCGM 100:2008 (GUM), law of propagation of uncertainty with independent inputs',
    lines,
    effectiveAreaM2,
    dischargeCoefficient,
    typeA: {
      standardUncertainty: uA,
      ar1StandardUncertainty: req.typeAStandardUncertainty,
      degreesOfFreedom: nuA,
      drift,
    },
    notes,
    warnings,
    table: budgetTable(lines, dischargeCoefficient, effectiveAreaM2),
  };
}

function combine(value: number, parts: Array<[number, number | null]>): CombinedQuantity {
  let sum2 = 0;
  let ws = 0;
  for (const [u, nu] of parts) {
    sum2 += u * u;
    if (nu !== null && Number.isFinite(nu)) ws += u ** 4 / nu;
  }
  const uc = Math.sqrt(sum2);
  const nu = ws > 0 ? Math.min(uc ** 4 / ws, NU_CAP) : NU_CAP;
  // an input whose coefficient could not be computed leaves u_c unknown: no k, no interval
  const k = Number.isFinite(uc) && nu > 0 ? tQuantile(0.975, nu) : NaN;
  return {
    value,
    combinedStandardUncertainty: uc,
    relativeStandardUncertainty: value !== 0 ? uc / Math.abs(value) : NaN,
    effectiveDegreesOfFreedom: nu,
    coverageFactor: k,
    expandedUncertainty: k * uc,
    ci95: [value - k * uc, value + k * uc],
  };
}
