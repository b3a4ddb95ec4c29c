import { InputError } from '../core/errors.js';
import {
  planDrainTest,
  planRequestSchema,
  type PlanResult,
  type PlannedTest,
  type PlanRequestInput,
} from '../core/plan/index.js';
import { describeIssue } from '../core/vessel/issues.js';
import { parseFlow, parseLength } from '../core/units/index.js';
import { parseVesselFile } from '../core/vessel/schema.js';
import { EXIT_OK, guarded, readInputFile } from './io.js';
import { parseCommandLine } from './options.js';

const USAGE = `usage: efflux plan --vessel <vessel.json> --noise 1.5mm --interval 1s [options]

Plans a drain test before anyone climbs the tank: the drain time to any level, the volume sent to
the drain, the peak outflow at opening and the flow over time, and the u of Cd·a and Cd the test
should reach; with a target, the least test that meets it (or why none can).

test:
  --from LEVEL           level when the valve opens (a reading above the sensor zero, e.g. 3.5m)
  --to LEVEL             level at which logging stops (default: where the fit's window ends)
  --max-level LEVEL      highest level the vessel may be filled to (default 95 % of its height)
  --cd VALUE             expected Cd (default: the usual value for the outlet type, said so)
  --trim DURATION        seconds after opening the fit leaves out (default 5s)
  --level LEVEL          also give the drain time to this level (repeatable)
sensor:
  --noise LENGTH         standard deviation of the reading noise (e.g. 1.5mm)
  --resolution LENGTH    smallest step of the reading (e.g. 1mm; default none)
  --interval DURATION    sample interval (e.g. 1s, 500ms, 1min)
  --lag1 RHO             lag-1 autocorrelation of the noise from one reading to the next (0 white)
target and budget:
  --target PERCENT       wanted u_r(Cd·a), e.g. 0.2%
  --target-cd PERCENT    wanted u_r(Cd) instead (the bore tolerance counts)
  --input "NAME=PERCENT" a stated type B input, its relative contribution to Cd·a (repeatable)
site:
  --discharge-limit FLOW the most the site may release (e.g. 10L/s), shown beside the peak
output:
  --json                 one JSON object (SI units, flows in L/s as named)
exit codes: 0 done, 2 input refused (the message names the option), other: internal fault.
`;

export async function run(argv: string[]): Promise<number> {
  return guarded(() => {
    const { values } = parseCommandLine(argv, {
      vessel: { type: 'string' },
      from: { type: 'string' },
      to: { type: 'string' },
      'max-level': { type: 'string' },
      cd: { type: 'string' },
      trim: { type: 'string' },
      level: { type: 'string', multiple: true },
      noise: { type: 'string' },
      resolution: { type: 'string' },
      interval: { type: 'string' },
      lag1: { type: 'string' },
      target: { type: 'string' },
      'target-cd': { type: 'string' },
      input: { type: 'string', multiple: true },
      'discharge-limit': { type: 'string' },
      json: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help) {
      process.stdout.write(USAGE);
      return EXIT_OK;
    }
    if (!values.vessel) throw new InputError('no vessel file given: add --vessel <vessel.json>');
    if (!values.noise && !values.resolution)
      throw new InputError('give the sensor: --noise (e.g. 1.5mm) and/or --resolution (e.g. 1mm)');
    if (!values.interval) throw new InputError('give the sample interval: --interval (e.g. 1s)');
    if (values.target && values['target-cd'])
      throw new InputError('give --target or --target-cd, not both');
    const vesselFile = readInputFile(values.vessel, 1024 * 1024);
    const vessel = parseVesselFile(new TextDecoder().decode(vesselFile.bytes), values.vessel);
    const len = (opt: string, v: string | undefined) =>
      v === undefined ? undefined : named(opt, () => parseLength(v));
    const req: PlanRequestInput = {
      sensor: {
        noiseM: len('--noise', values.noise) ?? 0,
        resolutionM: len('--resolution', values.resolution) ?? 0,
        sampleIntervalS: parseDuration('--interval', values.interval),
        noiseLag1: values.lag1 === undefined ? 0 : parseNumber('--lag1', values.lag1),
      },
      startLevelM: len('--from', values.from),
      endLevelM: len('--to', values.to),
      maxStartLevelM: len('--max-level', values['max-level']),
      expectedCd: values.cd === undefined ? undefined : parseNumber('--cd', values.cd),
      openingTrimS: values.trim === undefined ? undefined : parseDuration('--trim', values.trim),
      levelsM: (values.level ?? []).map((v) => named('--level', () => parseLength(v))),
      statedInputs: (values.input ?? []).map((v) => {
        const eq = v.lastIndexOf('=');
        if (eq <= 0)
          throw new InputError(`--input "${v}": write NAME=PERCENT, e.g. "plan area=0.3%"`);
        return {
          name: v.slice(0, eq).trim(),
          relativeStandardUncertainty: parseFraction('--input', v.slice(eq + 1)),
        };
      }),
      dischargeLimitLS:
        values['discharge-limit'] === undefined
          ? undefined
          : named('--discharge-limit', () => parseFlow(values['discharge-limit']!) * 1000),
    };
    if (values.target)
      req.target = {
        quantity: 'effective-area',
        relativeStandardUncertainty: parseFraction('--target', values.target),
      };
    if (values['target-cd'])
      req.target = {
        quantity: 'discharge-coefficient',
        relativeStandardUncertainty: parseFraction('--target-cd', values['target-cd']),
      };
    const parsed = planRequestSchema.safeParse(req);
    if (!parsed.success) {
      const { field, message } = describeIssue(parsed.error.issues[0], req);
      throw new InputError(message, { field: OPTION_OF[field] ?? field });
    }
    let result: PlanResult;
    try {
      result = planDrainTest(vessel, parsed.data);
    } catch (e) {
      const option = e instanceof InputError && e.field ? OPTION_OF[e.field] : undefined;
      if (option)
        throw new InputError(`${option}: ${e instanceof Error ? e.message : ''}`, {
          field: option,
        });
      throw e;
    }
    process.stdout.write(values.json ? `${JSON.stringify(result)}\n` : planText(result));
    return EXIT_OK;
  });
}

const OPTION_OF: Record<string, string> = {
  startLevelM: '--from',
  endLevelM: '--to',
  maxStartLevelM: '--max-level',
  expectedCd: '--cd',
  openingTrimS: '--trim',
  'sensor.noiseM': '--noise',
  'sensor.resolutionM': '--resolution',
  'sensor.sampleIntervalS': '--interval',
  'sensor.noiseLag1': '--lag1',
  'target.relativeStandardUncertainty': '--target',
  dischargeLimitLS: '--discharge-limit',
};

function named<T>(option: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${option}: ${e.message}`, { field: option });
    throw e;
  }
}

function parseNumber(option: string, text: string): number {
  const v = Number(text.trim());
  if (text.trim() === '' || !Number.isFinite(v))
    throw new InputError(`${option}: "${text}" is not a number`, { field: option });
  return v;
}

/** "0.2%" or a plain fraction "0.002". */
function parseFraction(option: string, text: string): number {
  const t = text.trim();
  return t.endsWith('%') ? parseNumber(option, t.slice(0, -1)) / 100 : parseNumber(option, t);
}

const DURATION_UNITS: Record<string, number> = { ms: 0.001, s: 1, sec: 1, min: 60, h: 3600 };

function parseDuration(option: string, text: string): number {
  const m = /^\s*(\d+(?:\.\d*)?|\.\d+)\s*([a-z]*)\s*$/i.exec(text);
  const unit = m?.[2].toLowerCase() ?? '';
  if (!m || !(unit in DURATION_UNITS))
    throw new InputError(`${option}: cannot read "${text}" as a duration (e.g. 1s, 500ms, 2min)`, {
      field: option,
    });
  return Number(m[1]) * DURATION_UNITS[unit];
}

const pct = (x: number) => `${Number((x * 100).toPrecision(3))} %`;
const m3 = (x: number) => `${x.toFixed(3)} m`;

function duration(s: number): string {
  if (s < 120) return `${s.toFixed(0)} s`;
  const h = Math.floor(s / 3600);
  const min = Math.round((s - h * 3600) / 60);
  return `${s.toFixed(0)} s (${h > 0 ? `${h} h ` : ''}${min} min)`;
}

function testLines(t: PlannedTest, r: PlanResult): string[] {
  const u = t.uncertainty;
  const band = r.assumptions.usualCdBand;
  const lines = [
    `  from ${m3(t.startLevelM)} (head ${m3(t.startHeadM)}), logged to ${m3(t.endLevelM)}`,
    `  logging time              ${duration(t.durationS)}; ${t.drainTimeToEndBandS[0].toFixed(0)}–${t.drainTimeToEndBandS[1].toFixed(0)} s across the usual Cd ${band[0]}–${band[1]}`,
    `  drain time to the outlet  ${duration(t.drainTimeToOutletS)}`,
    `  volume discharged         ${t.volumeDischargedM3.toFixed(2)} m³`,
    `  peak outflow at opening   ${t.peakOutflowLS.toFixed(2)} L/s`,
    `  fit window                ${t.windowStartS.toFixed(0)}–${t.windowEndS.toFixed(0)} s after opening, ${t.samplesInWindow} readings (${t.effectiveSamples.toFixed(0)} effectively independent), down to ${m3(t.windowEndLevelM)}`,
    `  u_r(Cd·a)                 ${pct(u.effectiveAreaRelative)}   (fit scatter, type A: ${pct(u.typeARelative)})`,
    `  u_r(Cd)                   ${pct(u.dischargeCoefficientRelative)}   (u(Cd) ${u.dischargeCoefficientStandard.toPrecision(2)})`,
  ];
  for (const l of u.lines.filter((x) => x.kind === 'B'))
    lines.push(
      `    type B: ${l.name} ${pct(l.relative)} on ${l.applies === 'effective-area' ? 'Cd·a and Cd' : 'Cd'}`,
    );
  for (const x of t.timesToLevels)
    lines.push(
      `  to ${m3(x.levelM)}: ${x.timeS === null ? 'not on this drain' : duration(x.timeS)}`,
    );
  return lines;
}

export function planText(r: PlanResult): string {
  const a = r.assumptions;
  const out: string[] = [
    `Drain-test plan: ${r.vessel.name}${r.vessel.site ? ` (${r.vessel.site})` : ''}`,
  ];
  out.push(
    `Assumed: Cd ${a.expectedCd} (${a.expectedCdSource}), Cd·a ${a.effectiveAreaM2.toPrecision(4)} m²; readings every ${a.sampleIntervalS} s, noise ${(a.noiseM * 1000).toPrecision(3)} mm, resolution ${(a.resolutionM * 1000).toPrecision(3)} mm, lag-1 ${a.noiseLag1} (variance factor ${a.varianceInflation.toPrecision(3)}); outlet at level ${m3(a.outletLevelM)}, highest fill ${m3(a.maxStartLevelM)}`,
    '',
  );
  if (r.test) {
    out.push(
      'Planned test:',
      ...testLines(r.test, r),
      '',
      'Level and outflow after opening:',
      '     time (s)   level (m)   outflow (L/s)',
    );
    const c = r.test.curve;
    const step = Math.max(1, Math.floor((c.timeS.length - 1) / 10));
    for (let i = 0; i < c.timeS.length; i += step)
      out.push(
        `  ${c.timeS[i].toFixed(0).padStart(11)} ${c.levelM[i].toFixed(3).padStart(11)} ${c.outflowLS[i].toFixed(2).padStart(15)}`,
      );
    out.push('');
  }
  if (r.target) {
    const label = r.target.quantity === 'effective-area' ? 'u_r(Cd·a)' : 'u_r(Cd)';
    out.push(
      `Target ${label} ≤ ${pct(r.target.relative)}: ${r.target.possible ? (r.target.met === null ? 'possible' : r.target.met ? 'met by the planned test' : 'NOT met by the planned test') : 'CANNOT be met'}`,
      `  ${r.target.reason}`,
    );
    const rec = r.recommendation;
    if (rec?.shortest) out.push('Shortest test that meets it:', ...testLines(rec.shortest, r));
    if (rec?.lowestStart)
      out.push(
        "Lowest start that meets it (logged to the window's end):",
        ...testLines(rec.lowestStart, r),
      );
    out.push('');
  }
  if (r.discharge.message) out.push(`Discharge: ${r.discharge.message}`, '');
  for (const n of r.notes) out.push(`Note: ${n}`);
  out.push('', 'Safety:', ...r.cautions.map((c) => `  - ${c}`));
  return out.join('\n') + '\n';
}
