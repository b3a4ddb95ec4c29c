import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { uploadDrainTest, type UploadTiming } from '../../jobs/ingest.js';
import { actorOf } from '../../store/users.js';
import { READERS, TECHNICIANS_UP } from '../access.js';
import { HttpProblem } from '../problems.js';
import { sendReadyText } from '../ready-text.js';
import { drainTest, fit, idParams, pageOf, paging, problem, protectedErrors } from '../schemas.js';
import { readUpload } from '../uploads.js';

/** RFC 6266 / RFC 8187: an ASCII fallback plus the exact UTF-8 name. */
function contentDisposition(name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, '_').replace(/["\\]/g, '_');
  return `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name)}`;
}

/**
 * Server-Timing (W3C) on an upload's answer: receive (multipart read), store-raw (SHA-256 and the
 * commit of the bytes), pool (hand-over, queue and reply around the engine), engine
 * (analyzeDrainTest in the worker), store-fit (the fit's commit and read-back), serialise (the
 * answer's JSON). Numbers for people measuring the service; nothing depends on them.
 */
const uploadTimings = new WeakMap<
  object,
  { receiveMs: number; timing: UploadTiming; doneAt: number }
>();
const dur = (name: string, ms: number | undefined) =>
  ms === undefined ? [] : [`${name};dur=${ms.toFixed(1)}`];

export const testRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/vessels/:id/tests',
    {
      config: { roles: TECHNICIANS_UP },
      schema: {
        tags: ['tests'],
        summary:
          'Upload a drain test (multipart: file "log", optional file "baro", settings and metadata fields); fitted at once',
        description:
          'Text fields: outletId, operator, loggerId, testedAt, notes, and the AnalysisSettings (timeColumn, levelColumn, unit, quantity, ' +
          'dateOrder, tz, delimiter, decimal, levelTag, baroTag, sheet, window, fitInflow, fitDatum, fitExponent; booleans as "true"/"false"). ' +
          'The raw bytes are stored before the analysis runs. A refused file is answered 422 and not kept. testedAt (ISO 8601 with offset) ' +
          "is the date of the test; without it, the first reading of the fitted window on the log's own clock (a log with elapsed time only needs testedAt). " +
          'The same bytes as an earlier test of the vessel: 409 naming it, unless allowDuplicate=true. Header Idempotency-Key: a retry with the same key answers the first result (Idempotency-Replayed: true).',
        consumes: ['multipart/form-data'],
        params: idParams,
        response: {
          201: z.object({ test: drainTest, fit }),
          409: problem,
          413: problem,
          415: problem,
          422: problem,
          503: problem,
          ...protectedErrors,
        },
      },
      onSend: async (request, reply, payload) => {
        const t = uploadTimings.get(request);
        if (t) {
          const { timing: x } = t;
          const engine = x.engineMs;
          const pool = x.poolMs === undefined ? undefined : x.poolMs - (engine ?? 0);
          const parts = [
            ...dur('receive', t.receiveMs),
            ...dur('store-raw', x.storeRawMs),
            ...dur('pool', pool),
            ...dur('engine', engine),
            ...dur('store-fit', x.storeFitMs),
            ...dur('serialise', performance.now() - t.doneAt),
          ];
          reply.header('server-timing', parts.join(', '));
        }
        return payload;
      },
    },
    async (request, reply) => {
      const vessel = await app.store.vessels.get(request.params.id); // 404 before reading the body
      const t0 = performance.now();
      const up = await readUpload(request);
      const receiveMs = performance.now() - t0;
      const timing: UploadTiming = {};
      const key = request.headers['idempotency-key'];
      if (key !== undefined && (typeof key !== 'string' || key.length === 0 || key.length > 200)) {
        throw new HttpProblem(
          400,
          'validation',
          'Idempotency-Key: one value of 1 to 200 characters',
          { errors: [{ path: 'headers.idempotency-key', message: '1 to 200 characters' }] },
        );
      }
      const out = await uploadDrainTest(
        app.store,
        app.analyze,
        actorOf(request.user!),
        { vesselId: vessel.id, ...up, idempotencyKey: key ?? null, nowMs: app.clockMs() },
        timing,
      );
      uploadTimings.set(request, { receiveMs, timing, doneAt: performance.now() });
      if (out.replayed) reply.header('idempotency-replayed', 'true');
      reply.code(201);
      return { test: out.test, fit: out.fit };
    },
  );

  app.get(
    '/api/vessels/:id/tests',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary: "A vessel's drain tests, newest first",
        params: idParams,
        querystring: paging,
        response: { 200: pageOf(drainTest), ...protectedErrors },
      },
    },
    async (request, reply) => {
      await app.store.vessels.assertExists(request.params.id);
      // spliced from the stored JSON (same shape as the schema; checked by the store's tests), kept as bytes
      return sendReadyText(
        request,
        reply,
        await app.store.tests.pageText(
          request.params.id,
          request.query.limit,
          request.query.offset,
        ),
      );
    },
  );

  app.get(
    '/api/tests/:id',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary: 'One drain test',
        params: idParams,
        response: { 200: drainTest, ...protectedErrors },
      },
    },
    async (request) => await app.store.tests.get(request.params.id),
  );

  app.get(
    '/api/tests/:id/fits',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary: "A test's fits, oldest first (refits supersede)",
        params: idParams,
        response: { 200: z.object({ items: z.array(fit) }), ...protectedErrors },
      },
    },
    async (request) => {
      await app.store.tests.get(request.params.id);
      return { items: await app.store.fits.listByTest(request.params.id) };
    },
  );

  app.get(
    '/api/tests/:id/raw',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary: 'The raw file byte for byte, under its original name',
        params: idParams,
        querystring: z.object({ file: z.enum(['log', 'baro']).default('log') }),
        response: { ...protectedErrors },
      },
    },
    async (request, reply) => {
      const t = await app.store.tests.get(request.params.id);
      const ref =
        request.query.file === 'baro' ? t.baro : { sha256: t.sha256, fileName: t.fileName };
      if (!ref) throw new HttpProblem(404, 'not-found', `test ${t.id} has no barometric file`);
      const bytes = await app.store.tests.rawBytes(ref.sha256);
      reply
        .type('application/octet-stream')
        .header('content-disposition', contentDisposition(ref.fileName))
        .header('x-content-sha256', ref.sha256)
        .header('cache-control', 'private, max-age=31536000, immutable');
      return reply.send(bytes as never); // a Buffer is sent as is, never serialised
    },
  );
};
