import { InputError } from '../errors.js';
import { makeShape } from '../geometry/index.js';
import type { DrainSetting } from '../drain/parameters.js';
import { USUAL_CD_BAND, nominalAreaM2 } from '../fit/coefficient.js';
import { STANDARD_GRAVITY_MS2 } from '../units/gravity.js';
import type { VesselSpec } from '../vessel/schema.js';
import { PLAN_CAUTIONS } from './cautions.js';
import { drainCurve, drainTimeS, surfaceAfter } from './drain-time.js';
import { noiseModel, relativeTypeAByLength, type NoiseModel } from './information.js';
import type { PlanRequest, TargetQuantity } from './schema.js';
import type { PlanResult, PlannedTest, UncertaintyLine } from './types.js';

export type { PlanResult, PlannedTest, UncertaintyLine } from './types.js';

/**
 * The drain-test planner: what a planned test will take (time, volume, peak flow) and what it
 * should give (u of Cd·a and Cd), and the least test that meets a target. Pure.
 *
 * Choices where the issue is silent:
 * - The fit's window is taken as the automatic chooser makes it for a clean drain: from
 *   `openingTrimS` after the valve opens to where the head falls to 5 % of the head at the
 *   window's start (server/core/window: shortest opening trim 5 s, headFraction 0.05), or to the
 *   end of logging if that comes first.
 * - "The least test" is read two ways, both given: the shortest logging time (valve open to stop)
 *   from the given start level (or the highest allowed fill), and the lowest start level that meets
 *   the target when the drain is logged to the window's end.
 * - Type B: the bore tolerance (rectangular, into Cd only, u_r(Cd)² gets (2·u_r(d))²) and any
 *   stated inputs, taken directly as relative contributions to Cd·a (no sensitivities derived
 *   here yet).
 */

/** Usual Cd by outlet type when none is expected: from memory of textbook values (sharp-edged ≈ 0.61, short tube ≈ 0.8, rounded ≈ 0.95, nozzle ≈ 0.97); valve and other take their band's middle. */
const TYPICAL_CD: Record<string, number> = {
  'sharp-edged': 0.61,
  'square-edged-short-tube': 0.8,
  rounded: 0.95,
  nozzle: 0.97,
  valve: 0.6,
  other: 0.75,
};

const HEAD_FRACTION = 0.05;
const DEFAULT_FILL_FRACTION = 0.95;

interface Context {
  req: PlanRequest;
  setting: DrainSetting;
  zs: number;
  datumFitted: boolean;
  cd: number;
  band: [number, number];
  cdA: number;
  outletLevelM: number;
  maxStartLevelM: number;
  noise: NoiseModel;
  boreRelative: number;
}

function contextFor(vessel: VesselSpec, req: PlanRequest): Context {
  const gravity = vessel.gravityMS2 ?? STANDARD_GRAVITY_MS2;
  const setting: DrainSetting = {
    shape: makeShape(vessel.shape),
    outletElevationM: vessel.outlet.elevationM,
    gravity,
  };
  const known =
    vessel.sensor?.zeroElevationM ?? (vessel.sensor?.mountElevationM !== undefined ? 0 : null);
  const zs = known ?? 0;
  const type = vessel.outlet.type ?? 'other';
  const cd = req.expectedCd ?? TYPICAL_CD[type];
  const band = USUAL_CD_BAND[type];
  const cdA = cd * nominalAreaM2(vessel.outlet.boreM);
  const outletLevelM = vessel.outlet.elevationM - zs;
  const top = setting.shape.heightM;
  const maxStartLevelM =
    req.maxStartLevelM ?? (Number.isFinite(top) ? DEFAULT_FILL_FRACTION * top - zs : NaN);
  if (!Number.isFinite(maxStartLevelM)) {
    throw new InputError(
      'the vessel file gives no height: state the highest level the vessel may be filled to',
      { field: 'maxStartLevelM' },
    );
  }
  if (maxStartLevelM + zs > top + 1e-9)
    throw new InputError(`the highest fill ${maxStartLevelM} m is above the vessel's top`, {
      field: 'maxStartLevelM',
    });
  if (!(maxStartLevelM > outletLevelM))
    throw new InputError('the highest fill is not above the outlet', { field: 'maxStartLevelM' });
  const noise = noiseModel(req.sensor);
  if (!(noise.varianceM2 > 0))
    throw new InputError(
      "give the sensor's noise or resolution: with neither, no scatter can be predicted",
      { field: 'sensor.noiseM' },
    );
  const boreRelative =
    (2 * ((vessel.outlet.boreToleranceM ?? 0) / Math.sqrt(3))) / vessel.outlet.boreM;
  return {
    req,
    setting,
    zs,
    datumFitted: known === null,
    cd,
    band,
    cdA,
    outletLevelM,
    maxStartLevelM,
    noise,
    boreRelative,
  };
}

function checkLevel(ctx: Context, levelM: number, field: string): void {
  const what = field === 'startLevelM' ? 'the start level' : 'the level';
  if (!(levelM > ctx.outletLevelM))
    throw new InputError(
      `${what} ${levelM} m is not above the outlet (level ${ctx.outletLevelM.toFixed(3)} m)`,
      { field },
    );
  if (levelM + ctx.zs > ctx.setting.shape.heightM + 1e-9)
    throw new InputError(
      `${what} ${levelM} m is above the vessel's top (${(ctx.setting.shape.heightM - ctx.zs).toFixed(3)} m as a level)`,
      { field },
    );
}

interface WindowGeometry {
  startSurface: number;
  windowStartSurface: number;
  cutSurface: number;
  windowStartS: number;
}

function windowGeometry(ctx: Context, startLevelM: number): WindowGeometry {
  const startSurface = startLevelM + ctx.zs;
  const trim = ctx.req.openingTrimS;
  const windowStartSurface = surfaceAfter(ctx.setting, ctx.cdA, startSurface, trim);
  const zo = ctx.setting.outletElevationM;
  const cutSurface = zo + HEAD_FRACTION * (windowStartSurface - zo);
  return { startSurface, windowStartSurface, cutSurface, windowStartS: trim };
}

/** Type A relative u for every window length from `startLevelM`, up to logging until `endSurface`. */
function typeAProfile(
  ctx: Context,
  g: WindowGeometry,
  endSurface: number,
  sampleIntervalS = ctx.req.sensor.sampleIntervalS,
): Float64Array {
  const windowEnd = Math.max(endSurface, g.cutSurface);
  const spanS = drainTimeS(ctx.setting, ctx.cdA, g.windowStartSurface, windowEnd);
  const samples = Math.floor(spanS / sampleIntervalS + 1e-9) + 1;
  if (samples < 10) return new Float64Array(0);
  return relativeTypeAByLength(
    {
      setting: ctx.setting,
      effectiveAreaM2: ctx.cdA,
      startSurfaceM: g.windowStartSurface,
      sensorZeroM: ctx.zs,
      datumFitted: ctx.datumFitted,
      sampleIntervalS,
      samples,
    },
    ctx.noise,
  );
}

function combine(ctx: Context, typeA: number): PlannedTest['uncertainty'] {
  const lines: UncertaintyLine[] = [
    {
      name: 'fit scatter (type A, predicted from the sampling)',
      relative: typeA,
      applies: 'effective-area',
      kind: 'A',
    },
  ];
  for (const s of ctx.req.statedInputs)
    lines.push({
      name: `${s.name} (stated)`,
      relative: s.relativeStandardUncertainty,
      applies: 'effective-area',
      kind: 'B',
    });
  if (ctx.boreRelative > 0)
    lines.push({
      name: 'bore tolerance (rectangular, ×2 into Cd)',
      relative: ctx.boreRelative,
      applies: 'discharge-coefficient',
      kind: 'B',
    });
  let area2 = 0;
  let cd2 = 0;
  for (const l of lines) {
    cd2 += l.relative ** 2;
    if (l.applies === 'effective-area') area2 += l.relative ** 2;
  }
  const ra = Math.sqrt(area2);
  const rc = Math.sqrt(cd2);
  return {
    lines,
    typeARelative: typeA,
    effectiveAreaRelative: ra,
    effectiveAreaStandardM2: ra * ctx.cdA,
    dischargeCoefficientRelative: rc,
    dischargeCoefficientStandard: rc * ctx.cd,
  };
}

function typeBFloor(
  ctx: Context,
  quantity: TargetQuantity,
): { floor: number; largest: string | null } {
  let f2 = 0;
  let largest: string | null = null;
  let big = 0;
  for (const s of ctx.req.statedInputs) {
    f2 += s.relativeStandardUncertainty ** 2;
    if (s.relativeStandardUncertainty > big)
      (big = s.relativeStandardUncertainty), (largest = s.name);
  }
  if (quantity === 'discharge-coefficient') {
    f2 += ctx.boreRelative ** 2;
    if (ctx.boreRelative > big) largest = 'the bore tolerance';
  }
  return { floor: Math.sqrt(f2), largest };
}

/** A planned test from `startLevelM`, logged until `endLevelM` (or the window's end); `windowSamples` shortens the window. */
function predictTest(
  ctx: Context,
  startLevelM: number,
  endLevelM: number | undefined,
  windowSamples?: number,
): PlannedTest {
  const g = windowGeometry(ctx, startLevelM);
  const dt = ctx.req.sensor.sampleIntervalS;
  const zo = ctx.setting.outletElevationM;
  let endSurface = endLevelM === undefined ? g.cutSurface : endLevelM + ctx.zs;
  const profile = typeAProfile(ctx, g, endSurface);
  let samples = profile.length;
  if (windowSamples !== undefined && windowSamples < samples) {
    samples = windowSamples;
    endSurface = surfaceAfter(ctx.setting, ctx.cdA, g.windowStartSurface, (samples - 1) * dt);
  }
  const windowEndSurface = Math.max(endSurface, g.cutSurface);
  const windowSpanS = drainTimeS(ctx.setting, ctx.cdA, g.windowStartSurface, windowEndSurface);
  const typeA = samples > 0 ? profile[samples - 1] : NaN;
  const durationS = drainTimeS(ctx.setting, ctx.cdA, g.startSurface, endSurface);
  const root2g = Math.sqrt(2 * ctx.setting.gravity);
  const nominal = ctx.cdA / ctx.cd;
  const curve = drainCurve(ctx.setting, ctx.cdA, g.startSurface, endSurface);
  const timesToLevels = ctx.req.levelsM.map((levelM) => {
    const surface = levelM + ctx.zs;
    return {
      levelM,
      timeS:
        surface > zo && surface <= g.startSurface
          ? drainTimeS(ctx.setting, ctx.cdA, g.startSurface, surface)
          : null,
    };
  });
  return {
    startLevelM,
    endLevelM: endSurface - ctx.zs,
    startHeadM: g.startSurface - zo,
    durationS,
    windowStartS: g.windowStartS,
    windowEndS: g.windowStartS + windowSpanS,
    windowEndLevelM: windowEndSurface - ctx.zs,
    samplesInWindow: samples,
    effectiveSamples: samples / ctx.noise.inflation,
    drainTimeToEndS: durationS,
    drainTimeToOutletS: drainTimeS(ctx.setting, ctx.cdA, g.startSurface, zo),
    // a low Cd drains slowest
    drainTimeToEndBandS: [
      drainTimeS(ctx.setting, ctx.band[1] * nominal, g.startSurface, endSurface),
      drainTimeS(ctx.setting, ctx.band[0] * nominal, g.startSurface, endSurface),
    ],
    volumeDischargedM3:
      ctx.setting.shape.volumeM3(g.startSurface) - ctx.setting.shape.volumeM3(endSurface),
    peakOutflowLS: ctx.cdA * root2g * Math.sqrt(g.startSurface - zo) * 1000,
    effectiveAreaM2: ctx.cdA,
    uncertainty: combine(ctx, typeA),
    timesToLevels,
    curve: {
      timeS: curve.timeS,
      levelM: curve.surfaceM.map((s) => s - ctx.zs),
      outflowLS: curve.outflowM3S.map((q) => q * 1000),
    },
  };
}

/** Fewest window samples with type A ≤ allowed, or −1. */
function firstMeeting(profile: Float64Array, allowed: number): number {
  for (let i = 0; i < profile.length; i++) if (profile[i] <= allowed) return i + 1;
  return -1;
}

function fullTypeA(ctx: Context, startLevelM: number, sampleIntervalS?: number): number {
  const g = windowGeometry(ctx, startLevelM);
  const p = typeAProfile(ctx, g, g.cutSurface, sampleIntervalS);
  return p.length ? p[p.length - 1] : Infinity;
}

function recommend(ctx: Context, allowed: number): NonNullable<PlanResult['recommendation']> {
  const top = ctx.maxStartLevelM;
  const fromTop = fullTypeA(ctx, top);
  if (!(fromTop <= allowed)) {
    // the interval that would do it, same noise per reading (bisection on a log scale)
    const dt = ctx.req.sensor.sampleIntervalS;
    let lo = dt / 1000;
    let hi = dt;
    let needed: number | null = null;
    if (fullTypeA(ctx, top, lo) <= allowed) {
      for (let k = 0; k < 40; k++) {
        const mid = Math.sqrt(lo * hi);
        if (fullTypeA(ctx, top, mid) <= allowed) lo = mid;
        else hi = mid;
      }
      needed = lo;
    }
    return { shortest: null, lowestStart: null, sampleIntervalNeededS: needed };
  }
  const start =
    ctx.req.startLevelM !== undefined && fullTypeA(ctx, ctx.req.startLevelM) <= allowed
      ? ctx.req.startLevelM
      : top;
  const g = windowGeometry(ctx, start);
  const n = firstMeeting(typeAProfile(ctx, g, g.cutSurface), allowed);
  const shortest = predictTest(ctx, start, undefined, n);
  // lowest start level logged to the window's end: type A falls as the start rises
  let lo = ctx.outletLevelM;
  let hi = top;
  for (let k = 0; k < 50 && hi - lo > 1e-4; k++) {
    const mid = 0.5 * (lo + hi);
    if (fullTypeA(ctx, mid) <= allowed) hi = mid;
    else lo = mid;
  }
  const lowestStart = predictTest(ctx, Math.ceil(hi * 1000) / 1000, undefined);
  return { shortest, lowestStart, sampleIntervalNeededS: null };
}

export function planDrainTest(vessel: VesselSpec, req: PlanRequest): PlanResult {
  const ctx = contextFor(vessel, req);
  if (req.startLevelM === undefined && !req.target) {
    throw new InputError('give a start level, a target uncertainty, or both', {
      field: 'startLevelM',
    });
  }
  if (req.startLevelM !== undefined) checkLevel(ctx, req.startLevelM, 'startLevelM');
  if (req.endLevelM !== undefined) {
    if (req.startLevelM === undefined)
      throw new InputError('an end level needs a start level', { field: 'endLevelM' });
    if (!(req.endLevelM < req.startLevelM))
      throw new InputError('the end level must be below the start level', { field: 'endLevelM' });
    if (!(req.endLevelM >= ctx.outletLevelM))
      throw new InputError(
        `the end level is below the outlet (level ${ctx.outletLevelM.toFixed(3)} m)`,
        { field: 'endLevelM' },
      );
  }
  const notes: string[] = [];
  const test =
    req.startLevelM !== undefined ? predictTest(ctx, req.startLevelM, req.endLevelM) : null;
  if (test && test.samplesInWindow < 10)
    notes.push('the planned window holds fewer than 10 readings: a fit would refuse it');

  let target: PlanResult['target'] = null;
  let recommendation: PlanResult['recommendation'] = null;
  if (req.target) {
    const quantity = req.target.quantity;
    const relative = req.target.relativeStandardUncertainty;
    const { floor, largest } = typeBFloor(ctx, quantity);
    const label = quantity === 'effective-area' ? 'u_r(Cd·a)' : 'u_r(Cd)';
    const achieved = test
      ? quantity === 'effective-area'
        ? test.uncertainty.effectiveAreaRelative
        : test.uncertainty.dischargeCoefficientRelative
      : null;
    if (floor >= relative) {
      target = {
        quantity,
        relative,
        met: achieved === null ? null : false,
        possible: false,
        typeBFloorRelative: floor,
        typeAAllowedRelative: null,
        reason: `the target ${label} ${pct(relative)} cannot be met by any test: ${largest} alone gives ${pct(floor)} (type B, which more data does not reduce)`,
      };
    } else {
      const allowed = Math.sqrt(relative ** 2 - floor ** 2);
      recommendation = recommend(ctx, allowed);
      const possible = recommendation.shortest !== null;
      let reason: string;
      if (possible)
        reason =
          floor > 0
            ? `the target ${label} ${pct(relative)} leaves ${pct(allowed)} for the fit's scatter after ${pct(floor)} of type B`
            : `no type B input is stated for ${label}: the fit's scatter may take all of ${pct(relative)}`;
      else if (recommendation.sampleIntervalNeededS !== null)
        reason = `even a full drain from the highest fill (${ctx.maxStartLevelM.toFixed(3)} m) misses ${label} ${pct(relative)} at ${req.sensor.sampleIntervalS} s sampling; sampling every ${sig(recommendation.sampleIntervalNeededS)} s would meet it if the noise per reading stayed the same`;
      else
        reason = `the target ${label} ${pct(relative)} cannot be met with this sensor from the highest fill (${ctx.maxStartLevelM.toFixed(3)} m)`;
      target = {
        quantity,
        relative,
        met: achieved === null ? null : achieved <= relative,
        possible,
        typeBFloorRelative: floor,
        typeAAllowedRelative: allowed,
        reason,
      };
    }
  }

  const peak = test?.peakOutflowLS ?? recommendation?.shortest?.peakOutflowLS ?? null;
  const limit = req.dischargeLimitLS ?? null;
  let discharge: PlanResult['discharge'] = {
    peakOutflowLS: peak,
    limitLS: limit,
    withinLimit: null,
    highestStartWithinLimitM: null,
    message: null,
  };
  if (limit !== null) {
    const headMax = (limit / 1000 / (ctx.cdA * Math.sqrt(2 * ctx.setting.gravity))) ** 2;
    const highest = ctx.setting.outletElevationM + headMax - ctx.zs;
    const within = peak === null ? null : peak <= limit;
    discharge = {
      peakOutflowLS: peak,
      limitLS: limit,
      withinLimit: within,
      highestStartWithinLimitM: highest,
      message:
        peak === null
          ? null
          : within
            ? `predicted peak outflow ${peak.toFixed(2)} L/s at opening, within the stated limit of ${limit} L/s`
            : `predicted peak outflow ${peak.toFixed(2)} L/s at opening EXCEEDS the stated limit of ${limit} L/s: start below ${highest.toFixed(3)} m, throttle the discharge, or agree the release with the receiver`,
    };
  }
  if (ctx.datumFitted)
    notes.push(
      'the vessel file gives no sensor zero: levels are heights above the vessel bottom, and the fit will have to free the datum (a much wider u)',
    );
  if (req.sensor.resolutionM > 0 && req.sensor.noiseM < req.sensor.resolutionM / 2) {
    notes.push(
      "the noise is below half the resolution: rounding is then not random and the fit's scatter may differ from this prediction",
    );
  }
  if (recommendation?.lowestStart) {
    notes.push(
      'a shallow drain meets the target on paper but is more exposed to low-head effects (vortices, the outlet uncovering, the opening transient) than this prediction shows; the shortest test from a high fill is the safer choice',
    );
  }
  if (req.statedInputs.length)
    notes.push(
      'stated type B inputs are taken as given (relative contributions to Cd·a); their sensitivities are not derived here',
    );
  notes.push(
    "type A assumes the drain follows the orifice law (n = ½) with no inflow and the readings' noise as stated; slosh, a leaking inlet or drift add to it",
  );

  return {
    vessel: { name: vessel.name, site: vessel.site ?? null },
    assumptions: {
      expectedCd: ctx.cd,
      expectedCdSource:
        req.expectedCd !== undefined
          ? 'given'
          : `usual value for a ${vessel.outlet.type ?? 'other'} outlet, from memory of textbook values`,
      usualCdBand: ctx.band,
      nominalAreaM2: nominalAreaM2(vessel.outlet.boreM),
      effectiveAreaM2: ctx.cdA,
      gravityMS2: ctx.setting.gravity,
      sensorZeroElevationM: ctx.zs,
      datumFitted: ctx.datumFitted,
      outletLevelM: ctx.outletLevelM,
      maxStartLevelM: ctx.maxStartLevelM,
      openingTrimS: req.openingTrimS,
      headFraction: HEAD_FRACTION,
      sampleIntervalS: req.sensor.sampleIntervalS,
      noiseM: req.sensor.noiseM,
      resolutionM: req.sensor.resolutionM,
      noiseLag1: req.sensor.noiseLag1,
      readingVarianceM2: ctx.noise.varianceM2,
      lag1SeenByFit: ctx.noise.lag1,
      varianceInflation: ctx.noise.inflation,
    },
    test,
    target,
    recommendation,
    discharge,
    cautions: PLAN_CAUTIONS,
    notes,
  };
}

function pct(x: number): string {
  return `${sig(x * 100)} %`;
}

function sig(x: number): string {
  return Number(x.toPrecision(3)).toString();
}
