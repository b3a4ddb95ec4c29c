import { z } from 'zod';
import type { JointFitResult } from '../fit-result/schema.js';
import { ENGINE_VERSION } from '../version.js';
import { InputError } from '../errors.js';
import { describeIssue } from '../vessel/issues.js';
import type { Alignment } from './align.js';
import type { SystemFitResult } from './fit.js';
import type { SystemModel } from './model.js';
import { buildNetwork, P, PER_VESSEL } from './network.js';
import { validateSystem, type SystemSpec } from './schema.js';

/**
 * The fit-system JSON: the outlets' Cd·a and Cd in GUM terms, the joint correlation, the
 * diagnostics, and enough to compute with later (the system as read, θ, the free parameters
 * and their covariance), so `steady` and `linearize` can take it in place of a system file.
 */
const SYSTEM_FIT_FORMAT = 'efflux-system-fit';

/** A logged inflow as used by the fit: which vessel, which file, how many readings bracket the span. */
export interface InflowLogUse {
  to: string;
  file: string;
  unit: string;
  samples: number;
  /** Time-average over the fitted span, m³/s (meanFlowOverSpan). */
  meanM3S: number;
  warnings: string[];
}

const UNITS = ['m²', 'm', 'm', 'm³/s'];
const bound = (x: number) => (Number.isFinite(x) ? x : null);

/** The joint fit in the one fit-result shape (core/fit-result/schema.ts: jointFitResult). */
export function systemFitJson(
  spec: SystemSpec,
  fit: SystemFitResult,
  alignment: Alignment,
  inflowLogs: readonly InflowLogUse[] = [],
): JointFitResult {
  const k = fit.free.length;
  const rows = (a: Float64Array) =>
    Array.from({ length: k }, (_, i) => Array.from(a.subarray(i * k, i * k + k)));
  const { solve } = fit;
  const json: JointFitResult = {
    format: SYSTEM_FIT_FORMAT,
    version: 2,
    engineVersion: ENGINE_VERSION,
    // the system in its file form, so it reads back through validateSystem
    system: {
      ...spec,
      inflows: spec.inflows.map((f) => ('log' in f ? f : { to: f.to, constant: f.constantM3S })),
    },
    converged: fit.converged,
    outlets: fit.outlets as unknown as JointFitResult['outlets'],
    parameters: fit.names.map((name, c) => {
      const value = fit.theta[fit.free[c]];
      const u = fit.standardUncertainties[c];
      return {
        name,
        unit: UNITS[fit.free[c] % PER_VESSEL],
        free: true,
        value,
        standardUncertainty: u,
        ci95: [value - fit.coverageFactor * u, value + fit.coverageFactor * u] as [number, number],
        start: fit.start[c],
        bounds: { lower: bound(fit.lower[c]), upper: bound(fit.upper[c]) },
        atBound: value <= fit.lower[c] || value >= fit.upper[c],
      };
    }),
    correlations: { parameters: fit.names, matrix: rows(fit.correlations) },
    solver: {
      method:
        'trust-region Levenberg–Marquardt (Moré scaling, QR with column pivoting), Jacobian from the sensitivity equations; two passes (unweighted, then 1/σ per log)',
      stopReason: solve.stopReason,
      converged: solve.converged,
      iterations: solve.iterations,
      evaluations: solve.evaluations,
      jacobianEvaluations: solve.jacobianEvaluations,
      rank: solve.rank,
      singularValues: Array.from(solve.singularValues),
      sumSquares: solve.sumSquares,
    },
    residuals: fit.vessels.map((v) => ({ ...v })),
    covariance: rows(fit.covariance),
    theta: Array.from(fit.theta),
    free: Array.from(fit.free),
    degreesOfFreedom: fit.degreesOfFreedom,
    coverageFactor: fit.coverageFactor,
    diagnostics: {
      uncertaintyMethod:
        'each log weighted by 1/σ from a first unweighted pass; each log’s information divided by its AR(1) effective-sample-size factor (1+ρ)/(1−ρ); Student-t at Σ m_i/f_i − k degrees of freedom',
      alignment: {
        t0: alignment.t0EpochMs === null ? null : new Date(alignment.t0EpochMs).toISOString(),
        spanS: alignment.spanS,
        samples: 'each log at its own sample times',
      },
      inflowLogs: inflowLogs.map((f) => ({
        to: f.to,
        file: f.file,
        unit: f.unit,
        samples: f.samples,
        meanM3S: f.meanM3S,
        interpolation: 'linear in time between readings',
      })),
    },
    warnings: [
      ...alignment.warnings.map((message) => ({ code: 'alignment', message })),
      ...inflowLogs.flatMap((f) =>
        f.warnings.map((w) => ({ code: 'inflow-log', message: `inflow log ${f.file}: ${w}` })),
      ),
      ...fit.warnings.map((message) => ({ code: 'joint-fit', message })),
    ],
  };
  // JSON has no NaN or ±Infinity: null, as for the single fit
  return JSON.parse(
    JSON.stringify(json, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v)),
  ) as JointFitResult;
}

const fitFileSchema = z.object({
  format: z.literal(SYSTEM_FIT_FORMAT),
  system: z.unknown(),
  theta: z.array(z.number()),
  free: z.array(z.number().int().min(0)),
  covariance: z.array(z.array(z.number())),
  degreesOfFreedom: z.number().positive(),
});

/** A SystemModel from a fit-system JSON document. */
function modelFromFitJson(
  value: unknown,
  fileName: string,
): { spec: SystemSpec; model: SystemModel } {
  const r = fitFileSchema.safeParse(value);
  if (!r.success) {
    const { field, message } = describeIssue(r.error.issues[0], value);
    throw new InputError(message, { file: fileName, field: field || undefined });
  }
  const spec = validateSystem(r.data.system, fileName);
  const network = buildNetwork(spec);
  const n = network.vessels.length;
  const k = r.data.free.length;
  if (r.data.theta.length !== n * PER_VESSEL)
    throw new InputError(`must hold ${n * PER_VESSEL} numbers for ${n} vessels`, {
      file: fileName,
      field: 'theta',
    });
  if (r.data.free.some((p) => p >= n * PER_VESSEL))
    throw new InputError('names a parameter that does not exist', {
      file: fileName,
      field: 'free',
    });
  if (r.data.covariance.length !== k || r.data.covariance.some((row) => row.length !== k)) {
    throw new InputError(`must be a ${k}×${k} matrix`, { file: fileName, field: 'covariance' });
  }
  return {
    spec,
    model: {
      network,
      theta: Float64Array.from(r.data.theta),
      free: Int32Array.from(r.data.free),
      covariance: Float64Array.from(r.data.covariance.flat()),
      degreesOfFreedom: r.data.degreesOfFreedom,
      specs: spec.vessels.map((v) => v.shape),
    },
  };
}

/** A SystemModel from a system file whose vessels state their Cd·a (or Cd); no uncertainty. */
function modelFromSystem(spec: SystemSpec, fileName: string): SystemModel {
  const network = buildNetwork(spec);
  const theta = new Float64Array(network.vessels.length * PER_VESSEL);
  network.vessels.forEach((v, i) => {
    if (v.knownEffectiveAreaM2 === null) {
      throw new InputError(
        'needs the outlet’s effectiveAreaM2 (or dischargeCoefficient) to compute without a fit; or give the output of fit-system --json',
        {
          file: fileName,
          field: `vessels.${i}.effectiveAreaM2`,
        },
      );
    }
    theta[i * PER_VESSEL + P.effectiveArea] = v.knownEffectiveAreaM2;
    theta[i * PER_VESSEL + P.sensorZero] = v.sensorZeroM ?? 0;
  });
  return {
    network,
    theta,
    free: new Int32Array(0),
    covariance: null,
    degreesOfFreedom: 1e7,
    specs: spec.vessels.map((v) => v.shape),
  };
}

/** Either kind of file: a fit-system JSON (has "format") or a system file. */
export function loadSystemModel(
  value: unknown,
  fileName: string,
): { spec: SystemSpec; model: SystemModel; fromFit: boolean } {
  if (value !== null && typeof value === 'object' && 'format' in value)
    return { ...modelFromFitJson(value, fileName), fromFit: true };
  const spec = validateSystem(value, fileName);
  return { spec, model: modelFromSystem(spec, fileName), fromFit: false };
}
