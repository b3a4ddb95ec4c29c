/**
 * Live drain tests over HTTP (server/jobs/live.ts holds them): open before the valve opens, send
 * rows as the logger writes them (raw bytes, any layout the reader accepts, with the byte offset
 * they start at), follow the readings and the refits as server-sent events, close to store the
 * bytes as an ordinary upload. The events are a plain SSE reply (text/event-stream written on the
 * raw response: no plugin needed for one-way messages; the browser's EventSource reconnects).
 */
import type { FastifyRequest } from 'fastify';
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { nameText, noteText } from '../../core/limits.js';
import { QUANTITIES } from '../../core/plan/schema.js';
import { LiveProblem, LiveTests, type LiveEvent } from '../../jobs/live.js';
import { actorOf } from '../../store/users.js';
import { READERS, TECHNICIANS_UP } from '../access.js';
import { HttpProblem, sendProblem } from '../problems.js';
import { assertSite } from '../site-scope.js';
import {
  analysisSettings,
  drainTest,
  fit,
  idParams,
  problem,
  protectedErrors,
} from '../schemas.js';

export interface LiveRouteOptions {
  limitBytes?: number;
  refitMs?: number;
  readMs?: number;
}

const liveParams = z.object({ id: z.uuid() });
const target = z.object({
  quantity: z.enum(QUANTITIES).default('discharge-coefficient'),
  relativeStandardUncertainty: z.number().positive().max(0.5),
});
const openBody = z.strictObject({
  fileName: nameText()
    .min(1)
    .regex(/^[^/\\\u0000-\u001f"]+$/, 'a plain file name, no folders or quotes'),
  outletId: z.number().int().positive().optional(),
  settings: analysisSettings.optional(),
  target: target.default({ quantity: 'discharge-coefficient', relativeStandardUncertainty: 0.01 }),
  operator: nameText().optional(),
  loggerId: nameText().optional(),
  notes: noteText().optional(),
});
const liveState = z
  .looseObject({
    id: z.string(),
    vesselId: z.number(),
    receivedBytes: z.number(),
    rows: z.number(),
    status: z.string(),
  })
  .meta({ id: 'LiveTest' });

export const liveRoutes: FastifyPluginAsyncZod<LiveRouteOptions> = async (app, opts) => {
  const live = await LiveTests.create({
    store: app.store,
    analyze: app.analyze,
    limitBytes: opts.limitBytes ?? 40 * 1024 * 1024,
    refitMs: opts.refitMs,
    readMs: opts.readMs,
  });
  // open event streams end before the server stops listening (they would hold its close open)
  const streams = new Set<() => void>();
  app.addHook('preClose', async () => {
    for (const end of streams) end();
  });
  app.addHook('onClose', async () => live.closeAll());
  // rows arrive as bytes, kept exactly (a text parser would decode them)
  app.removeContentTypeParser(['text/plain']);
  app.addContentTypeParser(
    ['application/octet-stream', 'text/plain', 'text/csv'],
    { parseAs: 'buffer' },
    (_req, body, done) => done(null, body),
  );

  const guard = async <T>(f: () => T | Promise<T>): Promise<T> => {
    try {
      return await f();
    } catch (e) {
      if (e instanceof LiveProblem)
        throw new HttpProblem(e.status, e.slug, e.message, e.extra as never);
      throw e;
    }
  };
  // a live test belongs to its vessel's site: the /api/live/:id routes are 'listed' and check it here
  const ownLive = async (request: FastifyRequest, id: string) => {
    const state = await guard(() => live.get(id));
    assertSite(request, await app.store.sites.siteOf('vessel', state.vesselId));
    return state;
  };

  app.post(
    '/api/vessels/:id/live',
    {
      config: { roles: TECHNICIANS_UP, scope: 'vessel' },
      schema: {
        tags: ['live'],
        summary: 'Open a live drain test before the valve opens; rows follow',
        params: idParams,
        body: openBody,
        response: { 201: liveState, 422: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const b = request.body;
      const state = await live.open(actorOf(request.user!), {
        vesselId: request.params.id,
        ...b,
        outletId: b.outletId ?? null,
      });
      reply.code(201);
      return state as never;
    },
  );

  app.get(
    '/api/live/:id',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['live'],
        summary:
          'A live test: bytes and rows held (a resuming sender sends from receivedBytes), the latest fit',
        params: liveParams,
        response: { 200: liveState, ...protectedErrors },
      },
    },
    async (request) => (await ownLive(request, request.params.id)) as never,
  );

  app.post(
    '/api/live/:id/rows',
    {
      config: { roles: TECHNICIANS_UP, scope: 'listed' },
      bodyLimit: 8 * 1024 * 1024,
      schema: {
        tags: ['live'],
        summary:
          'Append rows (raw bytes as the logger wrote them) starting at byte `offset`; answers the bytes held',
        description:
          'Content-Type application/octet-stream, text/plain or text/csv. Bytes already held are compared, not added twice; an offset past them is refused (409) with the count held.',
        params: liveParams,
        querystring: z.object({ offset: z.coerce.number().int().min(0).optional() }),
        response: {
          200: z.object({ receivedBytes: z.number(), rows: z.number(), latest: z.unknown() }),
          409: problem,
          413: problem,
          415: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const body = request.body;
      await ownLive(request, request.params.id);
      if (!Buffer.isBuffer(body))
        throw new HttpProblem(
          415,
          'unsupported-media-type',
          'send the rows as application/octet-stream, text/plain or text/csv',
        );
      try {
        const s = await live.append(request.params.id, request.query.offset, body);
        return {
          receivedBytes: s.receivedBytes,
          rows: s.rows,
          latest: s.latest && { ...s.latest, fittedCurve: undefined },
        };
      } catch (e) {
        if (e instanceof LiveProblem) {
          if (typeof e.extra.receivedBytes === 'number')
            reply.header('efflux-received-bytes', String(e.extra.receivedBytes));
          return sendProblem(reply, request, {
            type: `urn:efflux:problem:${e.slug}`,
            status: e.status,
            detail: e.message,
            ...(e.extra as object),
          }) as never;
        }
        throw e;
      }
    },
  );

  app.get(
    '/api/live/:id/events',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['live'],
        summary:
          'Server-sent events: rows (new readings in SI), fit (each refit), closed, abandoned',
        params: liveParams,
        response: { ...protectedErrors },
      },
    },
    async (request, reply) => {
      const state = await ownLive(request, request.params.id);
      reply.hijack();
      const res = reply.raw;
      res.writeHead(200, {
        'content-type': 'text/event-stream; charset=utf-8',
        'cache-control': 'no-store',
        connection: 'keep-alive',
        'x-accel-buffering': 'no',
      });
      const send = (e: LiveEvent | { type: 'state'; state: unknown }) =>
        res.write(`event: ${e.type}\ndata: ${JSON.stringify(e)}\n\n`);
      send({ type: 'state', state });
      const unsubscribe = live.subscribe(state.id, send);
      const ping = setInterval(() => res.write(': keep-alive\n\n'), 15_000);
      const end = () => {
        clearInterval(ping);
        unsubscribe();
        streams.delete(end);
        if (!res.writableEnded) res.end();
      };
      streams.add(end);
      request.raw.on('close', end);
    },
  );

  app.post(
    '/api/live/:id/close',
    {
      config: { roles: TECHNICIANS_UP, scope: 'listed' },
      schema: {
        tags: ['live'],
        summary: 'Close: store the received bytes as an ordinary upload (fit, audit, review)',
        description:
          'The same bytes as an earlier test of the vessel: 409 naming it (existingTestId), unless allowDuplicate=true.',
        params: liveParams,
        querystring: z.object({ allowDuplicate: z.enum(['true', 'false']).optional() }),
        response: {
          201: z.object({ test: drainTest, fit }),
          409: problem,
          422: problem,
          503: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      await ownLive(request, request.params.id);
      const out = await live
        .close(request.params.id, actorOf(request.user!), {
          allowDuplicate: request.query.allowDuplicate === 'true',
        })
        .catch((e) => {
          if (e instanceof LiveProblem) throw new HttpProblem(e.status, e.slug, e.message);
          throw e;
        });
      reply.code(201);
      return out;
    },
  );

  app.delete(
    '/api/live/:id',
    {
      config: { roles: TECHNICIANS_UP, scope: 'listed' },
      schema: {
        tags: ['live'],
        summary: 'Abandon a live test (nothing is stored)',
        params: liveParams,
        response: { 204: z.null(), ...protectedErrors },
      },
    },
    async (request, reply) => {
      await ownLive(request, request.params.id);
      await guard(() => live.abandon(request.params.id));
      reply.code(204);
      return null;
    },
  );
};
