import { makeShape, type ShapeSpec } from '../../../server/core/geometry/index.js';
import type { DrainSetting } from '../../../server/core/drain/parameters.js';
import { simulateDrainTest, type DrainSimulation } from '../../../server/core/drain/simulate.js';
import { fitDrain, type DrainFitInput } from '../../../server/core/fit/fit-drain.js';
import type { ModelTerms } from '../../../server/core/fit/terms.js';

export const g = 9.80665;

export function settingFor(shape: ShapeSpec, outletElevationM = 0): DrainSetting {
  return { shape: makeShape(shape), outletElevationM, gravity: g };
}

export interface Scenario {
  sim: Omit<DrainSimulation, 'setting'>;
  shape: ShapeSpec;
  outletElevationM?: number;
  boreM: number;
  terms?: Partial<ModelTerms>;
  knownZero?: boolean;
}

/** Simulate a pure drain (no hold) and fit it; returns the truth beside the result. */
export function simulateAndFit(sc: Scenario, essentialsOnly = false) {
  const setting = settingFor(sc.shape, sc.outletElevationM ?? 0);
  const log = simulateDrainTest({ ...sc.sim, setting, holdBeforeS: 0, holdAfterS: 0 });
  // keep the part above 15 % of the starting head, as the window chooser would
  const zs = sc.sim.sensorZeroElevationM;
  const zo = sc.outletElevationM ?? 0;
  const head0 = log.levelM[0] + zs - zo;
  let end = log.levelM.length;
  while (end > 10 && log.levelM[end - 1] + zs - zo < 0.15 * head0) end--;
  log.timeS = log.timeS.subarray(0, end);
  log.levelM = log.levelM.subarray(0, end);
  const terms: ModelTerms = { inflow: false, datum: false, exponent: false, ...sc.terms };
  const input: DrainFitInput = {
    setting,
    timeS: log.timeS,
    levelM: log.levelM,
    knownSensorZeroM: sc.knownZero === false ? null : sc.sim.sensorZeroElevationM,
    terms,
    outlet: { boreM: sc.boreM, boreToleranceM: 0 },
    essentialsOnly,
  };
  return {
    result: fitDrain(input),
    trueCd: sc.sim.effectiveAreaM2 / ((Math.PI * sc.boreM ** 2) / 4),
  };
}
