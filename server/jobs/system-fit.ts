/**
 * The joint fit of connected vessels as the service answers it (POST /api/systems/fit), computed
 * where it is run (a task thread in the service): read the system file and every log, align them,
 * fit, and the JSON of `efflux fit-system --json` plus `drawing` (each log thinned for charts).
 * The same pure code as the CLI (server/core/system).
 */
import { InputError } from '../core/errors.js';
import { alignLogs, type Alignment, type LogForSystem } from '../core/system/align.js';
import { fitSystem, type SystemFitResult } from '../core/system/fit.js';
import { systemFitJson, type InflowLogUse } from '../core/system/fit-json.js';
import { readFlowLog } from '../core/system/flow-log.js';
import { inflowOnFitClock, meanFlowOverSpan } from '../core/system/inflow-log.js';
import { buildNetwork, type InflowInput } from '../core/system/network.js';
import { readVesselLog } from '../core/system/read-vessel-log.js';
import { parseSystemFile, type SystemSpec } from '../core/system/schema.js';

/**
 * Readings (all logs, inside the common span) one fit over HTTP may take. The fit runs off the
 * event loop with a time limit (EFFLUX_TASK_TIMEOUT_S, 120 s for this task); this bound keeps it
 * well inside that limit on a small machine: bench/system-fit.ts measured 9.8 s for 197 900 readings
 * (≈ 50 µs each) on 2 cores at load ~10, a tenth of the limit (server/http/README.md, "Connected
 * vessels"). The CLI has no cap.
 */
export const MAX_FIT_SAMPLES = 200_000;
/**
 * A refusal inside one uploaded file names the form field it came in (the page says which of its
 * file fields to fix), unless it already names a column of that file.
 */
function atField<T>(field: string, read: () => T): T {
  try {
    return read();
  } catch (e) {
    if (e instanceof InputError && e.field === undefined)
      throw new InputError(e.message, { file: e.file, line: e.line, field });
    throw e;
  }
}

/** Points per vessel in the drawing part of the fit answer. */
const DRAW_POINTS = 600;

export interface SystemFileIn {
  bytes: Uint8Array;
  fileName: string;
}

export interface SystemFitFields {
  window?: string;
  fitDatum?: boolean;
  fitInflow?: boolean;
  unit?: string;
  tz?: string;
  dateOrder?: 'dmy' | 'mdy' | 'ymd';
  delimiter?: string;
  decimal?: '.' | ',';
}

export interface SystemFitInput {
  system: SystemFileIn;
  /** One log per vessel id, and one flow log per logged inflow's vessel id. */
  logs: [string, SystemFileIn][];
  flows: [string, SystemFileIn][];
  fields: SystemFitFields;
}

function parseWindow(text: string): { startS: number; endS?: number } {
  const [a, b] = text.split('..').map((s) => s.trim());
  return { startS: Number(a), endS: b === '' ? undefined : Number(b) };
}

export function systemFitAnswer(input: SystemFitInput): Record<string, unknown> {
  const { system, fields } = input;
  const flows = new Map(input.flows);
  const spec = parseSystemFile(new TextDecoder().decode(system.bytes), system.fileName);
  const network = buildNetwork(spec);
  const ids = new Map(spec.vessels.map((v, i) => [v.id, i]));
  const read: LogForSystem[] = [];
  for (const [id, file] of input.logs) {
    const vessel = ids.get(id);
    if (vessel === undefined)
      throw new InputError(
        `no vessel has id "${id}" (the system has ${[...ids.keys()].join(', ')})`,
        { field: `log:${id}` },
      );
    read.push(
      atField(`log:${id}`, () =>
        readVesselLog(spec, vessel, network.gravity, file, {
          unit: fields.unit,
          tz: fields.tz,
          dateOrder: fields.dateOrder,
          delimiter: fields.delimiter,
          decimal: fields.decimal,
        }),
      ),
    );
  }
  const missing = spec.vessels.filter((_, i) => !read.some((l) => l.vessel === i)).map((v) => v.id);
  if (missing.length)
    throw new InputError(
      `no log given for ${missing.join(', ')}: send a file field "log:ID" for every vessel`,
      { field: `log:${missing[0]}` },
    );
  const alignment = alignLogs(read, fields.window ? parseWindow(fields.window) : undefined);
  const samples = alignment.logs.reduce((s, l) => s + l.timeS.length, 0);
  if (samples > MAX_FIT_SAMPLES) {
    throw new InputError(
      `${samples} readings in the common span is more than the service fits at once (${MAX_FIT_SAMPLES}): give a shorter window, or run efflux fit-system`,
      { field: 'window' },
    );
  }
  const inflowLogs: InflowLogUse[] = [];
  const inflows: InflowInput[] = spec.inflows.map((f) => {
    const vessel = ids.get(f.to)!;
    if (!('log' in f)) return { vessel, constantM3S: f.constantM3S };
    // over HTTP the flow log named in the system file arrives as the file field "inflow:ID"
    const file = flows.get(f.to);
    if (!file)
      throw new InputError(
        `the system file gives a logged inflow for "${f.to}" (${f.log}): send it as the file field "inflow:${f.to}"`,
        { field: `inflow:${f.to}` },
      );
    const series = atField(`inflow:${f.to}`, () =>
      readFlowLog(file.bytes, file.fileName, {
        unit: f.unit,
        tz: fields.tz,
        dateOrder: fields.dateOrder,
        delimiter: fields.delimiter,
        decimal: fields.decimal,
      }),
    );
    const placed = atField(`inflow:${f.to}`, () => inflowOnFitClock(series, vessel, alignment));
    inflowLogs.push({
      to: f.to,
      file: file.fileName,
      unit: series.unit,
      samples: placed.timeS!.length,
      meanM3S: meanFlowOverSpan(placed.timeS!, placed.flowM3S!, alignment.spanS),
      warnings: series.warnings,
    });
    return placed;
  });
  const fit = fitSystem({
    network,
    logs: alignment.logs,
    inflows,
    terms: { datum: !!fields.fitDatum, leak: !!fields.fitInflow },
  });
  return {
    ...systemFitJson(spec, fit, alignment, inflowLogs),
    drawing: drawing(spec, fit, alignment),
  };
}

/** Each aligned log thinned to about DRAW_POINTS readings (every k-th), with the fitted curve = reading − residual. */
function drawing(spec: SystemSpec, fit: SystemFitResult, alignment: Alignment) {
  return alignment.logs.map((l) => {
    const res = fit.residuals[l.vessel];
    const step = Math.max(1, Math.ceil(l.timeS.length / DRAW_POINTS));
    const timeS: number[] = [];
    const levelM: number[] = [];
    const fittedM: number[] = [];
    for (let s = 0; s < l.timeS.length; s += step) {
      timeS.push(l.timeS[s]);
      levelM.push(l.levelM[s]);
      fittedM.push(l.levelM[s] - res[s]);
    }
    return { id: spec.vessels[l.vessel].id, fileName: l.fileName, timeS, levelM, fittedM };
  });
}
