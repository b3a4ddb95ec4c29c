import { InputError } from '../core/errors.js';
import { readLevelLog } from '../core/ingest/read-log.js';
import { parseFlow } from '../core/units/index.js';
import { fluidDensityKgM3 } from '../core/vessel/schema.js';
import { alignLogs, type LogForSystem } from '../core/system/align.js';
import { fitSystem } from '../core/system/fit.js';
import { loadSystemModel, systemFitJson } from '../core/system/fit-json.js';
import { linearize } from '../core/system/linear.js';
import { linearModelCsv, linearModelText } from '../core/system/linear-export.js';
import { buildNetwork } from '../core/system/network.js';
import { parseJsonText, parseSystemFile, type SystemSpec } from '../core/system/schema.js';
import { steadyState } from '../core/system/steady.js';
import { EXIT_OK, guarded, readInputFile } from './io.js';
import { parseCommandLine } from './options.js';

const FIT_USAGE = `usage: efflux fit-system <system.json> --log ID=FILE [--log ID=FILE …] [options]

Fits every outlet's Cd·a and Cd at once from the level logs of connected vessels in one test.
  --log ID=FILE          the level log of vessel ID (one per vessel in the system file)
  --window START..END    seconds from the logs' common start (default: the whole common span)
  --fit-datum            also fit each vessel's sensor zero
  --fit-inflow           also fit an unknown constant inflow into each vessel (a passing valve)
  --unit UNIT  --tz ZONE  --date-order dmy|mdy|ymd  --delimiter CHAR  --decimal . or ,   (for every log)
  --json                 one JSON object on stdout (steady and linearize accept it as input)
exit codes: 0 done, 2 input refused, other: internal fault.
`;

const STEADY_USAGE = `usage: efflux steady <system.json|fit.json> --inflow [ID=]FLOW [--inflow …] [--json]

Equilibrium levels at constant inflows (e.g. --inflow 2.5L/s into the top vessel, or
--inflow T2=1L/s), with intervals when given the output of fit-system --json. A system file
alone needs each vessel's "effectiveAreaM2" (or "dischargeCoefficient").
`;

const LINEAR_USAGE = `usage: efflux linearize <system.json|fit.json> --inflow [ID=]FLOW [--format json|csv|text]

State-space model dx/dt = A x + B u (C = I) about the equilibrium at the given inflows, with
each vessel's time constant and, from a fit, standard uncertainties.
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
      if (vessel === undefined) throw new InputError(`--log ${item}: no vessel has id "${id}" (the system has ${[...ids.keys()].join(', ')})`);
      if (logs.some((l) => l.vessel === vessel)) throw new InputError(`--log: vessel "${id}" is given twice`);
      const v = spec.vessels[vessel];
      const file = readInputFile(item.slice(eq + 1));
      const decimal = values.decimal;
      if (decimal !== undefined && decimal !== '.' && decimal !== ',') throw new InputError(`--decimal must be "." or "," (got "${decimal}")`);
      const dateOrder = values['date-order'];
      if (dateOrder !== undefined && !['dmy', 'mdy', 'ymd'].includes(dateOrder)) throw new InputError(`--date-order must be dmy, mdy or ymd (got "${dateOrder}")`);
      const series = readLevelLog(file.bytes, file.fileName, {
        unit: values.unit,
        tz: values.tz,
        dateOrder: dateOrder as 'dmy' | 'mdy' | 'ymd' | undefined,
        delimiter: values.delimiter,
        decimal: decimal as '.' | ',' | undefined,
        fluidDensityKgM3: v.fluid && 'densityKgM3' in v.fluid ? fluidDensityKgM3(v).value : undefined,
        mountElevationM: v.sensor?.mountElevationM,
        zeroElevationM: v.sensor?.zeroElevationM,
        gravityMS2: network.gravity,
      });
      logs.push({ vessel, fileName: file.fileName, timeS: series.timeS, levelM: series.levelM, t0EpochMs: series.t0EpochMs });
    }
    const missing = spec.vessels.filter((_, i) => !logs.some((l) => l.vessel === i)).map((v) => v.id);
    if (missing.length) throw new InputError(`no log given for ${missing.join(', ')}: add --log ID=FILE for every vessel`);
    const alignment = alignLogs(logs, values.window ? parseWindow(values.window) : undefined);
    const inflows = spec.inflows.map((f) => {
      if ('log' in f) throw new InputError(`inflow logs are not read yet: give a constant inflow for "${f.to}"`, { field: 'inflows' });
      return { vessel: ids.get(f.to)!, constantM3S: f.constantM3S };
    });
    const fit = fitSystem({ network, logs: alignment.logs, inflows, terms: { datum: !!values['fit-datum'], leak: !!values['fit-inflow'] } });
    const json = systemFitJson(spec, fit, alignment);
    if (values.json) {
      process.stdout.write(JSON.stringify(json, null, 2) + '\n');
      return EXIT_OK;
    }
    const lines = [`efflux fit-system: ${spec.name}`, fit.converged ? `converged (${fit.stopReason}, ${fit.iterations} iterations)` : `NOT converged (${fit.stopReason})`];
    for (const [id, o] of Object.entries(fit.outlets)) {
      const a = o.effectiveAreaM2;
      const cd = o.dischargeCoefficient;
      lines.push(`  ${id}: Cd·a = ${(a.value * 1e4).toFixed(4)} cm² ± ${(a.standardUncertainty * 1e4).toFixed(4)}  Cd = ${cd.value.toFixed(4)} (95 % ${cd.ci95[0].toFixed(4)} .. ${cd.ci95[1].toFixed(4)})`);
    }
    for (const v of fit.vessels) lines.push(`  log ${v.fileName} (${v.id}): ${v.samples} samples, noise ${(v.noiseM * 1000).toFixed(2)} mm, lag-1 ρ ${v.lag1Autocorrelation.toFixed(2)}`);
    for (const w of json.warnings) lines.push(`  warning: ${w}`);
    lines.push('Engineering estimates with stated uncertainty, not certification.');
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  });
}

export async function runSteady(argv: string[]): Promise<number> {
  return guarded(() => {
    const { values, positionals } = parseCommandLine(argv, { inflow: { type: 'string', multiple: true }, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' } });
    if (values.help) {
      process.stdout.write(STEADY_USAGE);
      return EXIT_OK;
    }
    const { spec, model, name } = readModel(positionals);
    const q = inflowsFrom(spec, values.inflow ?? [], name);
    const s = steadyState(model, q);
    if (values.json) {
      const ids = spec.vessels.map((v) => v.id);
      const body = {
        inflowM3S: Object.fromEntries(ids.map((id, i) => [id, q[i]])),
        vessels: Object.fromEntries(ids.map((id, i) => [id, { levelM: s.levelsM[i], headM: s.headsM[i], outflowM3S: s.flowsM3S[i] }])),
        covariance: s.covariance ? Array.from({ length: ids.length }, (_, i) => Array.from(s.covariance!.subarray(i * ids.length, (i + 1) * ids.length))) : null,
        uncertainty: s.covariance ? 'delta method with the exact sensitivities of the equilibrium' : 'none: Cd·a taken from the system file as exact',
        warnings: s.warnings,
      };
      process.stdout.write(JSON.stringify(body, null, 2) + '\n');
      return EXIT_OK;
    }
    const lines = [`efflux steady: ${spec.name}`];
    spec.vessels.forEach((v, i) => {
      const e = s.levelsM[i];
      const u = e.standardUncertainty !== null ? ` ± ${(e.standardUncertainty * 1000).toFixed(1)} mm (95 % ${e.ci95![0].toFixed(4)} .. ${e.ci95![1].toFixed(4)} m)` : '';
      lines.push(`  ${v.id}: level ${e.value.toFixed(4)} m above its bottom${u}; outflow ${(s.flowsM3S[i] * 1000).toFixed(3)} L/s`);
    });
    for (const w of s.warnings) lines.push(`  warning: ${w}`);
    process.stdout.write(lines.join('\n') + '\n');
    return EXIT_OK;
  });
}

export async function runLinearize(argv: string[]): Promise<number> {
  return guarded(() => {
    const { values, positionals } = parseCommandLine(argv, { inflow: { type: 'string', multiple: true }, format: { type: 'string' }, help: { type: 'boolean', short: 'h' } });
    if (values.help) {
      process.stdout.write(LINEAR_USAGE);
      return EXIT_OK;
    }
    const format = values.format ?? 'text';
    if (!['json', 'csv', 'text'].includes(format)) throw new InputError(`--format must be json, csv or text (got "${format}")`);
    const { spec, model, name } = readModel(positionals);
    const q = inflowsFrom(spec, values.inflow ?? [], name);
    const lm = linearize(model, q);
    const out = format === 'json' ? JSON.stringify(lm, null, 2) + '\n' : format === 'csv' ? linearModelCsv(lm) : linearModelText(lm);
    process.stdout.write(out);
    return EXIT_OK;
  });
}

function readSystem(positionals: string[]): SystemSpec {
  if (positionals.length !== 1) throw new InputError('give exactly one system file (usage: efflux fit-system <system.json> --log ID=FILE …)');
  const f = readInputFile(positionals[0], 4 * 1024 * 1024);
  return parseSystemFile(new TextDecoder().decode(f.bytes), positionals[0]);
}

function readModel(positionals: string[]) {
  if (positionals.length !== 1) throw new InputError('give exactly one system file or fit-system JSON');
  const name = positionals[0];
  const f = readInputFile(name, 16 * 1024 * 1024);
  return { ...loadSystemModel(parseJsonText(new TextDecoder().decode(f.bytes), name), name), name };
}

/** --inflow [ID=]FLOW, repeatable; a bare flow goes to the one vessel nothing discharges into. */
function inflowsFrom(spec: SystemSpec, items: string[], fileName: string): Float64Array {
  const q = new Float64Array(spec.vessels.length);
  const ids = new Map(spec.vessels.map((v, i) => [v.id, i]));
  if (items.length === 0) {
    const constant = spec.inflows.filter((f) => 'constantM3S' in f);
    if (!constant.length) throw new InputError('no inflow given: add --inflow FLOW (e.g. --inflow 2.5L/s) or --inflow ID=FLOW', { file: fileName });
    for (const f of constant) q[ids.get(f.to)!] += (f as { constantM3S: number }).constantM3S;
    return q;
  }
  for (const item of items) {
    const m = /^([^=]+)=(.*)$/.exec(item);
    let vessel: number;
    if (m && ids.has(m[1])) vessel = ids.get(m[1])!;
    else if (m && !/^\s*[\d.,+-]/.test(m[1])) throw new InputError(`--inflow ${item}: no vessel has id "${m[1]}"`);
    else {
      const tops = spec.vessels.map((_, i) => i).filter((i) => !spec.vessels.some((v) => v.dischargesTo === spec.vessels[i].id));
      if (tops.length !== 1) throw new InputError(`--inflow ${item}: the system has several top vessels (${tops.map((i) => spec.vessels[i].id).join(', ')}); say which, e.g. --inflow ${spec.vessels[tops[0]].id}=${item}`);
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
  if (!m) throw new InputError(`--window takes START..END in seconds from the logs' common start (got "${text}")`);
  return { startS: Number(m[1]), endS: m[2] === '' ? undefined : Number(m[2]) };
}
