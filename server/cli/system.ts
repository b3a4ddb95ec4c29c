import { dirname, isAbsolute, resolve } from 'node:path';
import { InputError } from '../core/errors.js';
import { timeUnitMs } from '../core/ingest/header.js';
import { parseFlow, parseLength } from '../core/units/index.js';
import { readFlowLog } from '../core/system/flow-log.js';
import { inflowOnFitClock } from '../core/system/inflow-log.js';
import type { InflowInput } from '../core/system/network.js';
import { levelsAfter, timeToLevel } from '../core/system/predict.js';
import { readVesselLog } from '../core/system/read-vessel-log.js';
import { alignLogs, type LogForSystem } from '../core/system/align.js';
import { fitSystem } from '../core/system/fit.js';
import {
  correlationLines,
  parameterLines,
  SAFETY_LINES,
  solverLine,
  warningLines,
} from '../core/fit-result/text.js';
import { loadSystemModel, systemFitJson } from '../core/system/fit-json.js';
import { linearize } from '../core/system/linear.js';
import { linearModelCsv, linearModelText } from '../core/system/linear-export.js';
import { buildNetwork } from '../core/system/network.js';
import { parseJsonText, parseSystemFile, type SystemSpec } from '../core/system/schema.js';
import { steadyState } from '../core/system/steady.js';
import {
  drainTimeWithBudget,
  drainVesselFromFit,
  levelAfterWithBudget,
} from '../core/budget/drain-time.js';
import { requireOrificeLaw, singleVesselModel } from '../core/budget/single-vessel.js';
import { openStore } from '../store/index.js';
import { NotFoundError } from '../store/errors.js';
import { dataDir } from './serve-config.js';
import { existsSync } from 'node:fs';
import { EXIT_OK, guarded, readInputFile } from './io.js';
import { parseCommandLine } from './options.js';

const FIT_USAGE = `usage: efflux fit-system <system.json> --log ID=FILE [--log ID=FILE …] [options]

Fits every outlet's Cd·a and Cd at once from the level logs of connected vessels in one test.
  --log ID=FILE          the level log of vessel ID (one per vessel in the system file)
  --window START..END    seconds from the logs' common start (default: the whole common span)
  --fit-datum            also fit each vessel's sensor zero
  --fit-inflow           also fit an unknown constant inflow into each vessel (a passing valve)
  --unit UNIT  --tz ZONE  --date-order dmy|mdy|ymd  --delimiter CHAR  --decimal . or ,   (for every log)
  --json                 one JSON object on stdout (steady, linearize and predict accept it as input)
Known inflows come from the system file's "inflows": {"to": ID, "constant": "2.5L/s"} or
{"to": ID, "log": "FILE", "unit"?: "L/s"}, a flow log (time and flow columns) whose path is
relative to the system file; it is read with --tz, --date-order, --delimiter and --decimal too,
interpolated linearly in time, and must cover the fitted span.
exit codes: 0 done, 2 input refused, other: internal fault.
`;

const MODEL_SOURCES = `The model: a system file, the output of fit-system --json, the output of efflux fit --json
(one vessel), or the id of a fit stored in the data folder (EFFLUX_DATA_DIR, as for efflux serve).
`;

const STEADY_USAGE =
  `usage: efflux steady <system.json|fit.json|FIT_ID> --inflow [ID=]FLOW [--inflow …] [--json]

Equilibrium levels at constant inflows (e.g. --inflow 2.5L/s into the top vessel, or
--inflow T2=1L/s), with intervals when given a fit. A system file
alone needs each vessel's "effectiveAreaM2" (or "dischargeCoefficient").
` + MODEL_SOURCES;

const LINEAR_USAGE =
  `usage: efflux linearize <system.json|fit.json|FIT_ID> --inflow [ID=]FLOW [--format json|csv|text]

State-space model dx/dt = A x + B u (C = I) about the equilibrium at the given inflows, with
each vessel's time constant and, from a fit, standard uncertainties.
` + MODEL_SOURCES;

const PREDICT_USAGE = `usage: efflux predict <system.json|fit.json|FIT_ID> --from [ID=]LEVEL [--from …] [--inflow [ID=]FLOW …]
                     (--after DURATION | --until ID=LEVEL) [--json]

Predicted levels after a time, or the time for one vessel to fall to a level, with 95 % intervals
when given the output of fit-system --json (a system file alone needs each vessel's
"effectiveAreaM2" or "dischargeCoefficient", and gives no interval).
  --from ID=LEVEL      start level of vessel ID above its lowest interior point (e.g. FT1=2.1m);
                       a vessel not named starts empty
  --inflow [ID=]FLOW   constant inflow (default: the system file's constant inflows, else none)
  --after DURATION     levels of every vessel after this time (e.g. 600s, 10min, 1.5h; a bare number is seconds)
  --until ID=LEVEL     time for vessel ID to fall from its start level to LEVEL
  --json               one JSON object on stdout
From a single-vessel fit (efflux fit --json, or a stored fit id) with no inflow the drain is
integrated exactly (closed form for a constant plan area) and the 95 % interval comes from the
fit's full uncertainty budget; ID may be left out (--from 3m --until 1m).
`;

export async function runFitSystem(argv: string[]): Promise<number> {
  return guarded(() => {
    const { values, positionals } = parseCommandLine(argv, {
      log: { type: 'string', multiple: true },
      window: { type: 'string' },
      'fit-datum': { type: 'boolean' },
      'fit-inflow': { type: 'boolean' },
      unit: { type: 'string' },
      tz: { type: 'string' },
      'date-order': { type: 'string' },
      delimiter: { type: 'string' },
      decimal: { type: 'string' },
      json: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help) {
      process.stdout.write(FIT_USAGE);
      return EXIT_OK;
    }
    const spec = readSystem(positionals);
    const network = buildNetwork(spec);
    const ids = new Map(spec.vessels.map((v, i) => [v.id, i]));
    const logs: LogForSystem[] = [];
    for (const item of values.log ?? []) {
      const eq = item.indexOf('=');
      if (eq <= 0) throw new InputError(`--log takes ID=FILE (got "${item}")`);
      const id = item.slice(0, eq);
      const vessel = ids.get(id);
      if (vessel === undefined)
        throw new InputError(
          `--log ${item}: no vessel has id "${id}" (the system has ${[...ids.keys()].join(', ')})`,
        );
      if (logs.some((l) => l.vessel === vessel))
        throw new InputError(`--log: vessel "${id}" is given twice`);
      const file = readInputFile(item.slice(eq + 1));
      const decimal = values.decimal;
      if (decimal !== undefined && decimal !== '.' && decimal !== ',')
        throw new InputError(`--decimal must be "." or "," (got "${decimal}")`);
      const dateOrder = values['date-order'];
      if (dateOrder !== undefined && !['dmy', 'mdy', 'ymd'].includes(dateOrder))
        throw new InputError(`--date-order must be dmy, mdy or ymd (got "${dateOrder}")`);
      logs.push(
        readVesselLog(spec, vessel, network.gravity, file, {
          unit: values.unit,
          tz: values.tz,
          dateOrder: dateOrder as 'dmy' | 'mdy' | 'ymd' | undefined,
          delimiter: values.delimiter,
          decimal: decimal as '.' | ',' | undefined,
        }),
      );
    }
    const missing = spec.vessels
      .filter((_, i) => !logs.some((l) => l.vessel === i))
      .map((v) => v.id);
    if (missing.length)
      throw new InputError(
        `no log given for ${missing.join(', ')}: add --log ID=FILE for every vessel`,
      );
    const alignment = alignLogs(logs, values.window ? parseWindow(values.window) : undefined);
    const inflowLogs: {
      to: string;
      file: string;
      unit: string;
      samples: number;
      warnings: string[];
    }[] = [];
    const inflows: InflowInput[] = spec.inflows.map((f) => {
      const vessel = ids.get(f.to)!;
      if (!('log' in f)) return { vessel, constantM3S: f.constantM3S };
      // a path in the system file is relative to the system file, wherever efflux is run from
      const path = isAbsolute(f.log) ? f.log : resolve(dirname(positionals[0]), f.log);
      const file = readInputFile(path);
      const series = readFlowLog(file.bytes, file.fileName, {
        unit: f.unit,
        tz: values.tz,
        dateOrder: values['date-order'] as 'dmy' | 'mdy' | 'ymd' | undefined,
        delimiter: values.delimiter,
        decimal: values.decimal as '.' | ',' | undefined,
      });
      const placed = inflowOnFitClock(series, vessel, alignment);
      inflowLogs.push({
        to: f.to,
        file: file.fileName,
        unit: series.unit,
        samples: placed.timeS!.length,
        warnings: series.warnings,
      });
      return placed;
    });
    const fit = fitSystem({
      network,
      logs: alignment.logs,
      inflows,
      terms: { datum: !!values['fit-datum'], leak: !!values['fit-inflow'] },
    });
    const json = systemFitJson(spec, fit, alignment, inflowLogs);
    if (values.json) {
      process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      return EXIT_OK;
    }
    const lines = [
      `efflux fit-system: ${spec.name}`,
      fit.converged
        ? `converged (${fit.stopReason}, ${fit.iterations} iterations)`
        : `NOT converged (${fit.stopReason})`,
      '─'.repeat(72),
    ];
    for (const [id, o] of Object.entries(fit.outlets)) {
      const a = o.effectiveAreaM2;
      const cd = o.dischargeCoefficient;
      lines.push(
        `  ${id}: Cd·a = ${(a.value * 1e4).toFixed(4)} cm² ± ${(a.standardUncertainty * 1e4).toFixed(4)}  Cd = ${cd.value.toFixed(4)} (95 % ${cd.ci95[0].toFixed(4)} .. ${cd.ci95[1].toFixed(4)})`,
      );
    }
    for (const v of fit.vessels)
      lines.push(
        `  log ${v.fileName} (${v.id}): ${v.samples} samples, noise ${(v.noiseM * 1000).toFixed(2)} mm, lag-1 ρ ${v.lag1Autocorrelation.toFixed(2)}`,
      );
    for (const f of inflowLogs)
      lines.push(
        `  inflow log ${f.file} (into ${f.to}): ${f.samples} readings in ${f.unit} over the fitted span, interpolated linearly`,
      );
    // the sections every fit's report shares (core/fit-result/text.ts)
    lines.push(
      '',
      ...parameterLines(json.parameters, 30),
      ...correlationLines(json.correlations),
      '',
      solverLine(json.solver, json.converged),
      '',
      ...warningLines(json.warnings),
    );
    lines.push('─'.repeat(72), ...SAFETY_LINES);
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  });
}

export async function runSteady(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, {
      inflow: { type: 'string', multiple: true },
      json: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help) {
      process.stdout.write(STEADY_USAGE);
      return EXIT_OK;
    }
    const { spec, model, name, single } = await readModel(positionals);
    if (single) requireOrificeLaw(single.vessel, name);
    const q = inflowsFrom(spec, values.inflow ?? [], name);
    const s = steadyState(model, q);
    if (values.json) {
      const ids = spec.vessels.map((v) => v.id);
      const body = {
        inflowM3S: Object.fromEntries(ids.map((id, i) => [id, q[i]])),
        vessels: Object.fromEntries(
          ids.map((id, i) => [
            id,
            { levelM: s.levelsM[i], headM: s.headsM[i], outflowM3S: s.flowsM3S[i] },
          ]),
        ),
        covariance: s.covariance
          ? Array.from({ length: ids.length }, (_, i) =>
              Array.from(s.covariance!.subarray(i * ids.length, (i + 1) * ids.length)),
            )
          : null,
        uncertainty: s.covariance
          ? 'delta method with the exact sensitivities of the equilibrium'
          : 'none: Cd·a taken from the system file as exact',
        warnings: s.warnings,
      };
      process.stdout.write(JSON.stringify(body, null, 2) + '\n');
      return EXIT_OK;
    }
    const lines = [`efflux steady: ${spec.name}`];
    spec.vessels.forEach((v, i) => {
      const e = s.levelsM[i];
      const u =
        e.standardUncertainty !== null
          ? ` ± ${(e.standardUncertainty * 1000).toFixed(1)} mm (95 % ${e.ci95![0].toFixed(4)} .. ${e.ci95![1].toFixed(4)} m)`
          : '';
      lines.push(
        `  ${v.id}: level ${e.value.toFixed(4)} m above its bottom${u}; outflow ${(s.flowsM3S[i] * 1000).toFixed(3)} L/s`,
      );
    });
    for (const w of s.warnings) lines.push(`  warning: ${w}`);
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  });
}

export async function runLinearize(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, {
      inflow: { type: 'string', multiple: true },
      format: { type: 'string' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help) {
      process.stdout.write(LINEAR_USAGE);
      return EXIT_OK;
    }
    const format = values.format ?? 'text';
    if (!['json', 'csv', 'text'].includes(format))
      throw new InputError(`--format must be json, csv or text (got "${format}")`);
    const { spec, model, name, single } = await readModel(positionals);
    if (single) requireOrificeLaw(single.vessel, name);
    const q = inflowsFrom(spec, values.inflow ?? [], name);
    const lm = linearize(model, q);
    const out =
      format === 'json'
        ? JSON.stringify(lm, null, 2) + '\n'
        : format === 'csv'
          ? linearModelCsv(lm)
          : linearModelText(lm);
    process.stdout.write(out);
    return EXIT_OK;
  });
}

export async function runPredict(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, {
      from: { type: 'string', multiple: true },
      inflow: { type: 'string', multiple: true },
      after: { type: 'string' },
      until: { type: 'string' },
      json: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help) {
      process.stdout.write(PREDICT_USAGE);
      return EXIT_OK;
    }
    if ((values.after === undefined) === (values.until === undefined))
      throw new InputError(
        'give one of --after DURATION (levels after a time) or --until ID=LEVEL (time to fall to a level)',
      );
    const { spec, model, name, fromFit, single } = await readModel(positionals);
    const ids = spec.vessels.map((v) => v.id);
    if (ids.length === 1) {
      // one vessel: ID= may be left out
      values.from = (values.from ?? []).map((x) => (x.includes('=') ? x : `${ids[0]}=${x}`));
      if (values.until !== undefined && !values.until.includes('='))
        values.until = `${ids[0]}=${values.until}`;
    }
    if (single && !(values.inflow ?? []).length)
      return predictSingle(
        single,
        spec.name,
        ids[0],
        values.from ?? [],
        values.after,
        values.until,
        !!values.json,
      );
    if (single) requireOrificeLaw(single.vessel, name);
    const start = new Float64Array(ids.length);
    const given = new Set<string>();
    for (const item of values.from ?? []) {
      const { vessel, value } = idValue(item, '--from', ids, parseLength);
      if (given.has(ids[vessel]))
        throw new InputError(`--from: vessel "${ids[vessel]}" is given twice`);
      given.add(ids[vessel]);
      start[vessel] = value;
    }
    if (given.size === 0)
      throw new InputError(
        "give each vessel's start level with --from ID=LEVEL (e.g. --from " + ids[0] + '=2.1m)',
      );
    const empty = ids.filter((id) => !given.has(id));
    const hasConstant = spec.inflows.some((f) => 'constantM3S' in f);
    const q =
      (values.inflow ?? []).length || hasConstant
        ? inflowsFrom(spec, values.inflow ?? [], name)
        : new Float64Array(ids.length);
    const inflows: InflowInput[] = Array.from(q, (x, i) => ({ vessel: i, constantM3S: x })).filter(
      (f) => f.constantM3S > 0,
    );
    const notes: string[] = [];
    if (empty.length)
      notes.push(
        `${empty.join(', ')} start${empty.length === 1 ? 's' : ''} empty (no --from given)`,
      );
    if (spec.inflows.some((f) => 'log' in f))
      notes.push(
        'the inflow log in the system file belongs to the test and is not used: give --inflow for a constant inflow',
      );
    if (!fromFit)
      notes.push(
        'no intervals: Cd·a taken from the system file as exact (give the output of fit-system --json for intervals)',
      );
    const inflowM3S = Object.fromEntries(ids.map((id, i) => [id, q[i]]));
    const startM = Object.fromEntries(ids.map((id, i) => [id, start[i]]));
    const mm = (x: number | null) => (x === null ? '' : ` ± ${(x * 1000).toPrecision(2)} mm`);
    if (values.after !== undefined) {
      const tS = parseDuration(values.after);
      const levels = levelsAfter(model, start, inflows, tS);
      if (values.json) {
        process.stdout.write(
          JSON.stringify(
            {
              startM,
              inflowM3S,
              afterS: tS,
              levelsM: Object.fromEntries(ids.map((id, i) => [id, levels[i]])),
              coverage: '95 %, delta method from the ODE sensitivities',
              notes,
            },
            null,
            2,
          ) + '\n',
        );
        return EXIT_OK;
      }
      const lines = [`efflux predict: ${spec.name}, levels after ${tS} s`];
      ids.forEach((id, i) => {
        const e = levels[i];
        const ci = e.ci95 ? ` (95 % ${e.ci95[0].toFixed(4)} .. ${e.ci95[1].toFixed(4)} m)` : '';
        lines.push(
          `  ${id}: ${start[i].toFixed(4)} m → ${e.value.toFixed(4)} m${mm(e.standardUncertainty)}${ci}`,
        );
      });
      for (const n of notes) lines.push(`  note: ${n}`);
      process.stdout.write(lines.join('\n') + '\n');
      return EXIT_OK;
    }
    const { vessel, value: toM } = idValue(values.until!, '--until', ids, parseLength);
    if (!given.has(ids[vessel]))
      throw new InputError(
        `--until ${values.until}: give the start level of ${ids[vessel]} with --from ${ids[vessel]}=LEVEL`,
      );
    const t = timeToLevel(model, start, inflows, vessel, toM);
    if (values.json) {
      process.stdout.write(
        JSON.stringify(
          {
            startM,
            inflowM3S,
            until: { vessel: ids[vessel], levelM: toM },
            timeS: t,
            coverage: '95 %, delta method from the ODE sensitivities',
            notes,
          },
          null,
          2,
        ) + '\n',
      );
      return EXIT_OK;
    }
    const s = (x: number) => x.toFixed(2);
    const ci = t.ci95 ? ` (95 % ${s(t.ci95[0])} .. ${s(t.ci95[1])} s)` : '';
    const lines = [
      `efflux predict: ${spec.name}`,
      `  ${ids[vessel]} falls from ${start[vessel].toFixed(4)} m to ${toM.toFixed(4)} m in ${s(t.value)} s${t.standardUncertainty === null ? '' : ` ± ${t.standardUncertainty.toPrecision(2)} s`}${ci} = ${(t.value / 60).toFixed(2)} min`,
    ];
    for (const n of notes) lines.push(`  note: ${n}`);
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  });
}

/** ID=VALUE with a vessel id from the system, the value read by `parse` (its errors prefixed by the option). */
function idValue(
  item: string,
  option: string,
  ids: string[],
  parse: (text: string) => number,
): { vessel: number; value: number } {
  const eq = item.indexOf('=');
  if (eq <= 0) throw new InputError(`${option} takes ID=LEVEL (got "${item}")`);
  const vessel = ids.indexOf(item.slice(0, eq));
  if (vessel < 0)
    throw new InputError(
      `${option} ${item}: no vessel has id "${item.slice(0, eq)}" (the system has ${ids.join(', ')})`,
    );
  try {
    return { vessel, value: parse(item.slice(eq + 1)) };
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${option}: ${e.message}`);
    throw e;
  }
}

/** 600, 600s, 10min, 1.5h: seconds. */
function parseDuration(text: string): number {
  const m = /^\s*(\d+(?:\.\d*)?|\.\d+)\s*([a-z]*)\s*$/i.exec(text);
  const per = m ? (m[2] === '' ? 1000 : timeUnitMs(m[2])) : null;
  if (!m || per === null)
    throw new InputError(`--after takes a duration such as 600s, 10min or 1.5h (got "${text}")`);
  const s = (Number(m[1]) * per) / 1000;
  if (!(s > 0)) throw new InputError(`--after must be a positive duration (got "${text}")`);
  return s;
}

function readSystem(positionals: string[]): SystemSpec {
  if (positionals.length !== 1)
    throw new InputError(
      'give exactly one system file (usage: efflux fit-system <system.json> --log ID=FILE …)',
    );
  const f = readInputFile(positionals[0], 4 * 1024 * 1024);
  return parseSystemFile(new TextDecoder().decode(f.bytes), positionals[0]);
}

async function readModel(positionals: string[]) {
  if (positionals.length !== 1)
    throw new InputError('give exactly one system file, fit JSON or stored fit id');
  const name = positionals[0];
  let value: unknown;
  if (/^\d+$/.test(name) && !existsSync(name)) value = await storedFitResult(Number(name));
  else {
    const f = readInputFile(name, 16 * 1024 * 1024);
    value = parseJsonText(new TextDecoder().decode(f.bytes), name);
  }
  const single = drainVesselFromFit(value);
  if (single) return { ...singleVesselModel(value, single, name), name, fromFit: true, single };
  return { ...loadSystemModel(value, name), name, single: null };
}

/** The result JSON of fit N in the data folder. */
async function storedFitResult(id: number): Promise<unknown> {
  const store = await openStore({ dataDir: dataDir() });
  try {
    return (await store.fits.get(id)).result;
  } catch (e) {
    if (e instanceof NotFoundError)
      throw new InputError(
        `no fit ${id} in the data folder ${dataDir()} (and no file of that name)`,
      );
    throw e;
  } finally {
    await store.close();
  }
}

/** predict from a single-vessel fit with no inflow: exact drain integral, intervals from the full budget. */
function predictSingle(
  single: NonNullable<ReturnType<typeof drainVesselFromFit>>,
  name: string,
  id: string,
  from: string[],
  after: string | undefined,
  until: string | undefined,
  json: boolean,
): number {
  if (from.length !== 1)
    throw new InputError(`give the start level with --from LEVEL (e.g. --from 3m)`);
  const level = (item: string, option: string) => idValue(item, option, [id], parseLength).value;
  const start = level(from[0], '--from');
  const basis =
    "95 %, from the fit's full uncertainty budget (each input through Cd·a and, for the vessel's own dimensions, directly; JCGM 100:2008)";
  const s2 = (x: number) => x.toFixed(2);
  if (after !== undefined) {
    const tS = parseDuration(after);
    const r = levelAfterWithBudget(single.vessel, single.lines, start, tS);
    const drained = r.value <= single.vessel.outletElevationM + 1e-9;
    if (json) {
      process.stdout.write(
        JSON.stringify(
          {
            vessel: name,
            id,
            startM: start,
            afterS: tS,
            levelM: r,
            drainedToOutlet: drained,
            coverage: basis,
          },
          null,
          2,
        ) + '\n',
      );
      return EXIT_OK;
    }
    const lines = [
      `efflux predict: ${name}, level after ${tS} s`,
      `  ${start.toFixed(4)} m → ${r.value.toFixed(4)} m ± ${(r.standardUncertainty * 1000).toPrecision(2)} mm (95 % ${r.ci95[0].toFixed(4)} .. ${r.ci95[1].toFixed(4)} m, k = ${r.coverageFactor.toFixed(2)})`,
    ];
    if (drained)
      lines.push(
        `  note: drained to the outlet's level (${single.vessel.outletElevationM} m) within that time`,
      );
    lines.push(`  interval: ${basis}`);
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  }
  const toM = level(until!, '--until');
  const r = drainTimeWithBudget(single.vessel, single.lines, start, toM);
  if (json) {
    process.stdout.write(
      JSON.stringify(
        { vessel: name, id, startM: start, until: { levelM: toM }, timeS: r, coverage: basis },
        null,
        2,
      ) + '\n',
    );
    return EXIT_OK;
  }
  const lines = [
    `efflux predict: ${name}`,
    `  falls from ${start.toFixed(4)} m to ${toM.toFixed(4)} m in ${s2(r.value)} s ± ${r.standardUncertainty.toPrecision(2)} s (95 % ${s2(r.ci95[0])} .. ${s2(r.ci95[1])} s, k = ${r.coverageFactor.toFixed(2)}) = ${(r.value / 60).toFixed(2)} min`,
    `  interval: ${basis}`,
  ];
  process.stdout.write(lines.join('\n') + '\n');
  return EXIT_OK;
}

/** --inflow [ID=]FLOW, repeatable; a bare flow goes to the one vessel nothing discharges into. */
function inflowsFrom(spec: SystemSpec, items: string[], fileName: string): Float64Array {
  const q = new Float64Array(spec.vessels.length);
  const ids = new Map(spec.vessels.map((v, i) => [v.id, i]));
  if (items.length === 0) {
    const constant = spec.inflows.filter((f) => 'constantM3S' in f);
    if (!constant.length)
      throw new InputError(
        'no inflow given: add --inflow FLOW (e.g. --inflow 2.5L/s) or --inflow ID=FLOW',
        { file: fileName },
      );
    for (const f of constant) q[ids.get(f.to)!] += (f as { constantM3S: number }).constantM3S;
    return q;
  }
  for (const item of items) {
    const m = /^([^=]+)=(.*)$/.exec(item);
    let vessel: number;
    if (m && ids.has(m[1])) vessel = ids.get(m[1])!;
    else if (m && !/^\s*[\d.,+-]/.test(m[1]))
      throw new InputError(`--inflow ${item}: no vessel has id "${m[1]}"`);
    else {
      const tops = spec.vessels
        .map((_, i) => i)
        .filter((i) => !spec.vessels.some((v) => v.dischargesTo === spec.vessels[i].id));
      if (tops.length !== 1)
        throw new InputError(
          `--inflow ${item}: the system has several top vessels (${tops.map((i) => spec.vessels[i].id).join(', ')}); say which, e.g. --inflow ${spec.vessels[tops[0]].id}=${item}`,
        );
      vessel = tops[0];
    }
    const text = m && ids.has(m[1]) ? m[2] : item;
    let flow: number;
    try {
      flow = parseFlow(text);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(`--inflow: ${e.message}`);
      throw e;
    }
    if (!(flow >= 0)) throw new InputError(`--inflow ${item}: must not be negative`);
    q[vessel] += flow;
  }
  return q;
}

function parseWindow(text: string): { startS: number; endS?: number } {
  const m = /^\s*([\d.]+)\s*\.\.\s*([\d.]*)\s*$/.exec(text);
  if (!m)
    throw new InputError(
      `--window takes START..END in seconds from the logs' common start (got "${text}")`,
    );
  return { startS: Number(m[1]), endS: m[2] === '' ? undefined : Number(m[2]) };
}
