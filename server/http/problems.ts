/**
 * Every error leaves as application/problem+json (RFC 9457): type, title, status, detail, instance;
 * `errors: [{path, message}]` for validation; file/line/field when an input was refused.
 * Never a stack trace: unexpected errors are logged and answered with a generic 500.
 */
import type { FastifyError, FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import {
  hasZodFastifySchemaValidationErrors,
  isResponseSerializationError,
} from 'fastify-type-provider-zod';
import { isInputError } from '../core/errors.js';
import { ExportsBusyError } from '../jobs/exports.js';
import { AnalysisTimeoutError } from '../jobs/pool.js';
import { TaskQueueFullError, TaskTimeoutError } from '../jobs/tasks.js';
import { EngineUnavailableError } from '../jobs/worker-reply.js';
import {
  ConflictError,
  DuplicateUploadError,
  ForbiddenError,
  isDiskFull,
  NotFoundError,
} from '../store/errors.js';

export interface Problem {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  file?: string;
  line?: number;
  field?: string;
  errors?: { path: string; message: string }[];
  /** 409 duplicate upload: the test that already has these bytes. */
  existingTestId?: number;
}

const TITLES: Record<number, string> = {
  400: 'Bad request',
  401: 'Not signed in',
  403: 'Not allowed',
  404: 'Not found',
  405: 'Method not allowed',
  406: 'Not acceptable',
  409: 'Conflict',
  413: 'Too large',
  415: 'Unsupported media type',
  422: 'Input refused',
  429: 'Too many requests',
  500: 'Internal error',
  503: 'Unavailable',
  507: 'Insufficient storage',
};

/** Problem types are URNs in the project's namespace: stable names, nothing to dereference. */
const typeOf = (slug: string) => `urn:efflux:problem:${slug}`;

/** An error a handler throws to answer with a given problem. */
export class HttpProblem extends Error {
  constructor(
    readonly status: number,
    readonly slug: string,
    detail: string,
    readonly extra: Partial<Problem> = {},
  ) {
    super(detail);
    this.name = 'HttpProblem';
  }
}

export function sendProblem(
  reply: FastifyReply,
  request: FastifyRequest,
  p: Omit<Problem, 'instance' | 'title'> & { title?: string },
) {
  const body: Problem = {
    ...p,
    title: p.title ?? TITLES[p.status] ?? 'Error',
    instance: request.url,
  };
  return reply.code(p.status).type('application/problem+json').send(body);
}

interface FieldIssue {
  path: string;
  message: string;
  tooLong: boolean;
}

/**
 * Field problems as one answer: 422 `too-long` naming the field when every problem is text past
 * its limit (server/core/limits.ts: the value is understood, there is just too much of it), else
 * 400 `validation` with every problem.
 */
function fieldsProblem(
  issues: FieldIssue[],
): Omit<Problem, 'instance' | 'title'> & { title?: string } {
  const errors = issues.map(({ path, message }) => ({ path, message }));
  const detail = errors.map((e) => `${e.path}: ${e.message}`).join('; ');
  if (issues.length > 0 && issues.every((i) => i.tooLong)) {
    return {
      type: typeOf('too-long'),
      status: 422,
      title: 'Input refused',
      detail,
      field: issues[0].path,
      errors,
    };
  }
  return { type: typeOf('validation'), status: 400, title: 'Invalid request', detail, errors };
}

const isTooLongText = (code: string, origin: unknown) => code === 'too_big' && origin === 'string';

/** A refusal of multipart text fields checked with zod outside Fastify's own validation. */
export function refuseFields(
  issues: readonly {
    code: string;
    path: PropertyKey[];
    message: string;
    origin?: unknown;
    keys?: string[];
  }[],
): HttpProblem {
  const p = fieldsProblem(
    issues.map((i) => ({
      path: i.path.length ? i.path.map(String).join('.') : (i.keys?.join(',') ?? ''),
      message: i.message,
      tooLong: isTooLongText(i.code, i.origin),
    })),
  );
  return new HttpProblem(p.status, p.type.replace('urn:efflux:problem:', ''), p.detail ?? '', {
    title: p.title,
    errors: p.errors,
    field: p.field,
  });
}

function toProblem(err: unknown): Omit<Problem, 'instance' | 'title'> & { title?: string } {
  if (err instanceof HttpProblem)
    return { type: typeOf(err.slug), status: err.status, detail: err.message, ...err.extra };
  if (hasZodFastifySchemaValidationErrors(err)) {
    const where = (err as { validationContext?: string }).validationContext ?? 'request';
    return fieldsProblem(
      err.validation.map((v) => ({
        path: [where, ...v.instancePath.split('/').filter(Boolean)].join('.'),
        message: v.message ?? 'invalid',
        tooLong: isTooLongText(v.keyword, (v.params as { origin?: unknown } | undefined)?.origin),
      })),
    );
  }
  if (isInputError(err)) {
    return {
      type: typeOf('input-refused'),
      status: 422,
      detail: err.toLine(),
      file: err.file,
      line: err.line,
      field: err.field,
      errors: [{ path: err.field ?? err.file ?? 'input', message: err.message }],
    };
  }
  if (isDiskFull(err)) {
    return {
      type: typeOf('disk-full'),
      status: 507,
      detail:
        "The service's disk is full: nothing of this request was kept. Tell the administrator; retry once space is freed.",
    };
  }
  if (err instanceof NotFoundError)
    return { type: typeOf('not-found'), status: 404, detail: err.message };
  if (err instanceof DuplicateUploadError)
    return {
      type: typeOf('duplicate-upload'),
      status: 409,
      detail: err.message,
      existingTestId: err.existingTestId,
    };
  if (err instanceof ForbiddenError)
    return { type: typeOf('forbidden'), status: 403, detail: err.message };
  if (err instanceof ConflictError)
    return { type: typeOf('conflict'), status: 409, detail: err.message };
  if (err instanceof EngineUnavailableError || err instanceof AnalysisTimeoutError) {
    return { type: typeOf('analysis-unavailable'), status: 503, detail: err.message };
  }
  // heavy work past its time limit, or too much of it waiting: nothing was written, ask again later
  if (err instanceof TaskTimeoutError)
    return { type: typeOf('over-time-limit'), status: 503, detail: err.message };
  if (err instanceof TaskQueueFullError || err instanceof ExportsBusyError)
    return { type: typeOf('busy'), status: 503, detail: err.message };
  const fe = err as FastifyError;
  if (
    !isResponseSerializationError(err) &&
    typeof fe.statusCode === 'number' &&
    fe.statusCode >= 400 &&
    fe.statusCode < 500
  ) {
    return { type: 'about:blank', status: fe.statusCode, detail: fe.message };
  }
  return {
    type: 'about:blank',
    status: 500,
    detail: 'The service could not complete the request; the error was logged.',
  };
}

/**
 * Bodies are read as sent: a compressed body (any Content-Encoding but identity) is refused before
 * it is read, 415 with Accept-Encoding: identity (RFC 9110 §15.5.16), instead of failing later
 * inside a parser.
 */
function refuseEncodedBodies(app: FastifyInstance): void {
  app.addHook('onRequest', async (request, reply) => {
    const enc = request.headers['content-encoding'];
    if (enc === undefined) return;
    const codings = String(enc)
      .split(',')
      .map((s) => s.trim().toLowerCase())
      .filter(Boolean);
    if (codings.every((c) => c === 'identity')) return;
    reply.header('accept-encoding', 'identity');
    await sendProblem(reply, request, {
      type: typeOf('content-encoding'),
      status: 415,
      detail: `Content-Encoding "${String(enc).slice(0, 40)}" is not accepted; send the body uncompressed`,
    });
    return reply;
  });
}

export function installProblemHandlers(app: FastifyInstance): void {
  refuseEncodedBodies(app);
  app.setErrorHandler((err, request, reply) => {
    const p = toProblem(err);
    if (p.status === 507) request.log.error({ err }, 'disk full');
    else if (p.status >= 500) request.log.error({ err }, 'request failed');
    if (p.status === 401) reply.header('www-authenticate', 'Bearer');
    if (p.status === 503) reply.header('retry-after', '30');
    return sendProblem(reply, request, p);
  });
  app.setNotFoundHandler((request, reply) =>
    sendProblem(reply, request, {
      type: typeOf('not-found'),
      status: 404,
      detail: `no route ${request.method} ${request.url.split('?')[0]}`,
    }),
  );
}
