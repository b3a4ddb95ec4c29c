/**
 * Connected vessels over HTTP: the joint fit of every outlet's Cd·a from one test's logs, the
 * equilibrium levels at given inflows, and the linear (state-space) model about them. The same
 * pure code as `efflux fit-system`, `steady` and `linearize` (server/core/system). POST
 * /api/systems/fit only tries a fit (nothing stored; its answer is the document `steady` and
 * `linearize` take back); POST /api/systems/fits keeps one as a record (routes/joint-fits.ts).
 *
 * The joint fit runs in the task pool (jobs/system-fit.ts), off the event loop, with a time limit
 * (503 past it); its readings are capped at MAX_FIT_SAMPLES there, measured to stay well inside it.
 * The module's one export is the plugin: `await app.register(systemRoutes)`.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import { jointFitResult } from '../../core/fit-result/schema.js';
import { InputError } from '../../core/errors.js';
import { tagText } from '../../core/limits.js';
import { loadSystemModel } from '../../core/system/fit-json.js';
import { linearize } from '../../core/system/linear.js';
import { linearModelCsv, linearModelText } from '../../core/system/linear-export.js';
import type { SystemSpec } from '../../core/system/schema.js';
import { steadyState } from '../../core/system/steady.js';
import { parseFlow } from '../../core/units/index.js';
import { READERS, TECHNICIANS_UP } from '../access.js';
import { HttpProblem, refuseFields } from '../problems.js';
import { problem, protectedErrors } from '../schemas.js';

const MAX_LOGS = 12;

const bool = z.enum(['true', 'false']).transform((s) => s === 'true');
export const fitFields = z
  .object({
    window: tagText().regex(
      /^\s*[\d.]+\s*\.\.\s*[\d.]*\s*$/,
      'START..END in seconds from the logs’ common start',
    ),
    fitDatum: bool,
    fitInflow: bool,
    unit: tagText().min(1),
    tz: tagText().min(1),
    dateOrder: z.enum(['dmy', 'mdy', 'ymd']),
    delimiter: z.string().min(1).max(3),
    decimal: z.enum(['.', ',']),
  })
  .partial()
  .strict();

const estimate = z.object({
  value: z.number(),
  standardUncertainty: z.number().nullable(),
  ci95: z.tuple([z.number(), z.number()]).nullable(),
});

const fitAnswer = jointFitResult
  .extend({
    drawing: z.array(
      z.object({
        id: z.string(),
        fileName: z.string(),
        timeS: z.array(z.number()),
        levelM: z.array(z.number()),
        fittedM: z.array(z.number()),
      }),
    ),
  })
  .meta({
    id: 'SystemFit',
    description:
      'The output of `efflux fit-system --json` (the one fit-result shape), plus `drawing` (each log thinned for charts, with the fitted curve)',
  });

const inflowItem = z.object({
  to: tagText()
    .min(1)
    .optional()
    .meta({ description: 'vessel id; omitted: the one vessel nothing discharges into' }),
  flow: z
    .union([tagText().min(1), z.number().min(0)])
    .meta({ description: 'e.g. "2.5L/s", "9 m3/h", or m³/s as a number' }),
});
const operatingBody = z.object({
  system: z
    .record(z.string(), z.unknown())
    .meta({ description: 'a system file, or the answer of POST /api/systems/fit' }),
  inflows: z
    .array(inflowItem)
    .max(50)
    .optional()
    .meta({ description: 'omitted: the constant inflows of the system file' }),
});

const steadyAnswer = z
  .object({
    inflowM3S: z.record(z.string(), z.number()),
    vessels: z.record(
      z.string(),
      z.object({
        levelM: estimate,
        headM: z.number(),
        outflowM3S: z.number(),
        heightM: z.number(),
      }),
    ),
    covariance: z.array(z.array(z.number())).nullable(),
    uncertainty: z.string(),
    warnings: z.array(z.string()),
  })
  .meta({ id: 'SystemSteadyState' });

const linearAnswer = z
  .looseObject({
    ids: z.array(z.string()),
    a: z.array(estimate),
    b: z.array(estimate),
    timeConstantsS: z.array(estimate),
    modeTimeConstantsS: z.array(z.number()),
    text: z.string(),
    csv: z.string(),
  })
  .meta({ id: 'SystemLinearModel' });

export const systemRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/systems/fit',
    {
      config: { roles: TECHNICIANS_UP, scope: 'none' },
      schema: {
        tags: ['systems'],
        summary:
          'Joint fit of connected vessels from one test’s logs, tried only (POST /api/systems/fits keeps one)',
        description:
          'multipart/form-data: file "system" (the system file), one file "log:ID" per vessel (ID as in the system file), one file "inflow:ID" for each logged inflow the system file names, and optional text fields window (START..END s), fitDatum, fitInflow (true/false), unit, tz, dateOrder, delimiter, decimal (for every log).',
        consumes: ['multipart/form-data'],
        response: { 200: fitAnswer, 413: problem, 415: problem, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const { system, logs, flows, fields } = await readSystemUpload(request);
      const transfer = [system.bytes, ...[...logs.values(), ...flows.values()].map((f) => f.bytes)];
      return (await app.tasks(
        'system-fit',
        { system, logs: [...logs], flows: [...flows], fields },
        { transfer },
      )) as z.infer<typeof fitAnswer>;
    },
  );

  app.post(
    '/api/systems/steady',
    {
      config: { roles: READERS, scope: 'none' },
      schema: {
        tags: ['systems'],
        summary: 'Equilibrium levels at constant inflows, with intervals from a fit',
        body: operatingBody,
        response: { 200: steadyAnswer, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const { spec, model } = loadSystemModel(request.body.system, 'system');
      const q = inflowVector(spec, request.body.inflows);
      const s = steadyState(model, q);
      const ids = spec.vessels.map((v) => v.id);
      const n = ids.length;
      return {
        inflowM3S: Object.fromEntries(ids.map((id, i) => [id, q[i]])),
        vessels: Object.fromEntries(
          ids.map((id, i) => [
            id,
            {
              levelM: s.levelsM[i],
              headM: s.headsM[i],
              outflowM3S: s.flowsM3S[i],
              heightM: model.network.vessels[i].shape.heightM,
            },
          ]),
        ),
        covariance: s.covariance
          ? Array.from({ length: n }, (_, i) =>
              Array.from(s.covariance!.subarray(i * n, (i + 1) * n)),
            )
          : null,
        uncertainty: s.covariance
          ? 'delta method with the exact sensitivities of the equilibrium'
          : 'none: Cd·a taken from the system file as exact',
        warnings: s.warnings,
      };
    },
  );

  app.post(
    '/api/systems/linearize',
    {
      config: { roles: READERS, scope: 'none' },
      schema: {
        tags: ['systems'],
        summary:
          'State-space model dx/dt = A x + B u about the equilibrium, time constants, as JSON, with the same model as labelled text tables and as CSV',
        body: operatingBody,
        response: { 200: linearAnswer, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const { spec, model } = loadSystemModel(request.body.system, 'system');
      const lm = linearize(model, inflowVector(spec, request.body.inflows));
      return { ...lm, text: linearModelText(lm), csv: linearModelCsv(lm) };
    },
  );
};

export interface FileIn {
  bytes: Uint8Array;
  fileName: string;
}

/** The multipart body of a joint fit: the files, and the text fields checked by `schema`. */
export async function readSystemUpload<S extends z.ZodType = typeof fitFields>(
  request: FastifyRequest,
  schema?: S,
): Promise<{
  system: FileIn;
  logs: Map<string, FileIn>;
  flows: Map<string, FileIn>;
  fields: z.infer<S>;
}> {
  if (!request.isMultipart())
    throw new HttpProblem(
      415,
      'multipart-required',
      'send multipart/form-data with a file field "system" and one "log:ID" per vessel',
    );
  let system: FileIn | null = null;
  const logs = new Map<string, FileIn>();
  const flows = new Map<string, FileIn>();
  const text: Record<string, string> = {};
  const refuse = (path: string, message: string) =>
    new HttpProblem(400, 'validation', `${path}: ${message}`, {
      title: 'Invalid request',
      errors: [{ path, message }],
    });
  for await (const part of request.parts({ limits: { files: 2 * MAX_LOGS + 1 } })) {
    if (part.type !== 'file') {
      text[part.fieldname] = String(part.value);
      continue;
    }
    const bytes = await part.toBuffer(); // 413 past the upload limit
    const fileName =
      (part.filename ?? '')
        .split(/[\\/]/)
        .pop()!
        .replace(/[\u0000-\u001f\u007f"]/g, '')
        .slice(0, 255) || `${part.fieldname}.csv`;
    if (bytes.byteLength === 0) throw refuse(part.fieldname, 'the file is empty');
    if (part.fieldname === 'system') {
      if (system) throw refuse('system', 'sent twice');
      system = { bytes, fileName };
    } else if (part.fieldname.startsWith('log:') && part.fieldname.length > 4) {
      const id = part.fieldname.slice(4);
      if (logs.has(id)) throw refuse(part.fieldname, 'sent twice');
      logs.set(id, { bytes, fileName });
    } else if (part.fieldname.startsWith('inflow:') && part.fieldname.length > 7) {
      const id = part.fieldname.slice(7);
      if (flows.has(id)) throw refuse(part.fieldname, 'sent twice');
      flows.set(id, { bytes, fileName });
    } else
      throw refuse(
        part.fieldname,
        'unexpected file (send "system", "log:ID" and, for a logged inflow, "inflow:ID")',
      );
  }
  if (!system) throw refuse('system', 'required: the system file');
  const parsed = (schema ?? fitFields).safeParse(text);
  if (!parsed.success) throw refuseFields(parsed.error.issues);
  return { system, logs, flows, fields: parsed.data as z.infer<S> };
}

/** Inflows as [{to?, flow}]; a flow without `to` goes to the single vessel nothing discharges into. */
function inflowVector(
  spec: SystemSpec,
  items: z.infer<typeof inflowItem>[] | undefined,
): Float64Array {
  const q = new Float64Array(spec.vessels.length);
  const ids = new Map(spec.vessels.map((v, i) => [v.id, i]));
  if (!items || items.length === 0) {
    const constant = spec.inflows.filter(
      (f): f is { to: string; constantM3S: number } => 'constantM3S' in f,
    );
    if (!constant.length)
      throw new InputError('no inflow given: add inflows, e.g. [{"flow": "2.5L/s"}]', {
        field: 'inflows',
      });
    for (const f of constant) q[ids.get(f.to)!] += f.constantM3S;
    return q;
  }
  items.forEach((item, k) => {
    let vessel: number;
    if (item.to !== undefined) {
      const i = ids.get(item.to);
      if (i === undefined)
        throw new InputError(
          `no vessel has id "${item.to}" (the system has ${[...ids.keys()].join(', ')})`,
          { field: `inflows.${k}.to` },
        );
      vessel = i;
    } else {
      const tops = spec.vessels
        .map((_, i) => i)
        .filter((i) => !spec.vessels.some((v) => v.dischargesTo === spec.vessels[i].id));
      if (tops.length !== 1)
        throw new InputError(
          `the system has several top vessels (${tops.map((i) => spec.vessels[i].id).join(', ')}): say which with "to"`,
          { field: `inflows.${k}.to` },
        );
      vessel = tops[0];
    }
    let flow: number;
    if (typeof item.flow === 'number') flow = item.flow;
    else {
      try {
        flow = parseFlow(item.flow);
      } catch (e) {
        if (e instanceof InputError)
          throw new InputError(e.message, { field: `inflows.${k}.flow` });
        throw e;
      }
    }
    if (!(flow >= 0)) throw new InputError('must not be negative', { field: `inflows.${k}.flow` });
    q[vessel] += flow;
  });
  return q;
}
