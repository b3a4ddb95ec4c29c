import { InputError } from '../errors.js';
import { buildNetwork, P, PER_VESSEL } from '../system/network.js';
import type { SystemModel } from '../system/model.js';
import { validateSystem, type SystemSpec } from '../system/schema.js';
import type { DrainVessel } from './drain-time.js';

/**
 * A single-vessel fit (efflux fit --json, or a stored fit's result) as a one-vessel system, so
 * `steady`, `linearize` and `predict` with an inflow can use it. Cd·a carries the budget's
 * combined standard uncertainty and ν_eff (a one-vessel system has no other outlet to correlate).
 */
export function singleVesselModel(
  value: unknown,
  single: { vessel: DrainVessel; name: string; id: string },
  fileName: string,
): { spec: SystemSpec; model: SystemModel } {
  const f = value as Record<string, any>;
  const { nominalAreaM2: _nominal, ...outlet } = f.outlet as Record<string, unknown>;
  void _nominal;
  const zero = (f.parameters as any[] | undefined)?.find(
    (p) => p.name === 'sensorZeroElevationM',
  )?.value;
  const spec = validateSystem(
    {
      name: single.name,
      vessels: [
        {
          name: single.name,
          id: single.id,
          shape: f.vessel.shape,
          outlet,
          ...(typeof zero === 'number' ? { sensor: { zeroElevationM: zero } } : {}),
          gravityMS2: single.vessel.gravity,
          dischargesTo: null,
          connection: 'free',
          effectiveAreaM2: single.vessel.effectiveAreaM2,
        },
      ],
    },
    fileName,
  );
  const network = buildNetwork(spec);
  const theta = new Float64Array(PER_VESSEL);
  theta[P.effectiveArea] = single.vessel.effectiveAreaM2;
  theta[P.sensorZero] = typeof zero === 'number' ? zero : 0;
  const u = f.effectiveAreaM2?.standardUncertainty;
  if (!(typeof u === 'number' && u >= 0))
    throw new InputError('the fit has no standard uncertainty of Cd·a', {
      file: fileName,
      field: 'effectiveAreaM2.standardUncertainty',
    });
  const nu = f.effectiveAreaM2?.effectiveDegreesOfFreedom ?? 1e7;
  return {
    spec,
    model: {
      network,
      theta,
      free: Int32Array.of(P.effectiveArea),
      covariance: Float64Array.of(u * u),
      degreesOfFreedom: nu,
      specs: [spec.vessels[0].shape],
    },
  };
}

/** Steady states, linear models and predictions with an inflow use the orifice law: refuse a fit with another exponent. */
export function requireOrificeLaw(vessel: DrainVessel, fileName: string): void {
  if (Math.abs(vessel.exponent - 0.5) > 1e-12) {
    throw new InputError(
      `the fit's head exponent is n = ${vessel.exponent}; steady states, linear models and predictions with an inflow use the orifice law (n = 0.5): refit without --fit-exponent, or predict with no inflow`,
      { file: fileName, field: 'parameters.headExponent' },
    );
  }
}
