import type { PreparedTest } from '../analysis/analyze.js';
import type { DrainFitResult } from '../fit/fit-drain.js';
import { THETA } from '../drain/parameters.js';
import { uncertaintyBudget, type UncertaintyBudget } from './budget.js';
import type { InputContext } from './inputs.js';

/** The budget of one analysed drain test (what analyzeDrainTest adds to the fit JSON as `budget`). */
export function budgetForFit(
  p: PreparedTest,
  fit: DrainFitResult,
  data: { timeS: Float64Array; levelM: Float64Array },
): UncertaintyBudget {
  const roles = p.series.columns.map((c) => c.role);
  const quantity: InputContext['quantity'] = roles.includes('absolute-pressure')
    ? 'absolute-pressure'
    : roles.includes('gauge-pressure')
      ? 'gauge-pressure'
      : roles.includes('distance-from-top')
        ? 'distance-from-top'
        : 'level';
  const v = fit.variant;
  const col = Array.from(v.free).indexOf(THETA.effectiveArea);
  return uncertaintyBudget({
    vessel: p.vessel,
    quantity,
    densityKgM3: p.density.value,
    densitySource: p.density.source,
    datumFitted: v.terms.datum,
    gravity: p.setting.gravity,
    boreM: p.vessel.outlet.boreM,
    model: {
      setting: p.setting,
      shapeSpec: p.vessel.shape,
      outletElevationM: p.vessel.outlet.elevationM,
      solution: v.solution,
      theta: v.theta,
      free: v.free,
      timeS: data.timeS,
      levelM: data.levelM,
    },
    typeAStandardUncertainty: fit.uncertainty.standardUncertainties[col],
    typeADegreesOfFreedom: fit.uncertainty.degreesOfFreedom,
    headBands: fit.headBands,
  });
}
