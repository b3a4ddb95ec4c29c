import { THETA } from '../../../server/core/drain/parameters.js';
import { residualDiagnostics } from '../../../server/core/stats/index.js';
import { headBands } from '../../../server/core/fit/head-bands.js';
import { uncertaintyBudget, type UncertaintyBudget } from '../../../server/core/budget/budget.js';
import type { InputContext } from '../../../server/core/budget/inputs.js';
import type { DrainFitResult } from '../../../server/core/fit/fit-drain.js';
import type { VesselSpec } from '../../../server/core/vessel/schema.js';
import { settingFor, g } from '../fit/simulated.js';

/** The budget of a fitted drain, as analyzeDrainTest builds it, from the pieces a test holds. */
export function budgetOf(
  vessel: VesselSpec,
  fit: DrainFitResult,
  data: { timeS: Float64Array; levelM: Float64Array },
  extra: Partial<InputContext> = {},
  withBands = false,
): UncertaintyBudget {
  const setting = settingFor(vessel.shape, vessel.outlet.elevationM);
  const v = fit.variant;
  const col = Array.from(v.free).indexOf(THETA.effectiveArea);
  const bands = withBands
    ? headBands(
        { setting, timeS: data.timeS, levelM: data.levelM },
        v,
        fit.uncertainty.varianceInflation,
      )
    : fit.headBands;
  return uncertaintyBudget({
    vessel,
    quantity: 'level',
    densityKgM3: 998.2,
    densitySource: 'density given in the vessel file',
    datumFitted: v.terms.datum,
    gravity: g,
    boreM: vessel.outlet.boreM,
    model: {
      setting,
      shapeSpec: vessel.shape,
      outletElevationM: vessel.outlet.elevationM,
      solution: v.solution,
      theta: v.theta,
      free: v.free,
      timeS: data.timeS,
      levelM: data.levelM,
    },
    typeAStandardUncertainty: fit.uncertainty.standardUncertainties[col],
    typeADegreesOfFreedom: fit.uncertainty.degreesOfFreedom,
    headBands: bands,
    ...extra,
  });
}

export { residualDiagnostics };
