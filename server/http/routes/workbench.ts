/**
 * What the web workbench needs beside the resource routes: a look at a logger file before anything
 * is stored (the first lines, what the reader detected, the whole series for the window chart),
 * and the parsed series of a stored test at full resolution (the fit view draws the window on it).
 * Both run the same pure reader as a fit (prepareDrainTest), so what is shown is what is fitted.
 * Reading and writing the answer's JSON run in the task pool (jobs/workbench-read.ts): a
 * million-row file takes a second or two there, with a time limit (503 past it); this thread
 * only gathers the bytes and sends the finished JSON.
 * The module's one export is the plugin: `await app.register(workbenchRoutes)`.
 */
import type { FastifyReply } from 'fastify';
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { AnalysisSettings } from '../../core/analysis-contract.js';
import { chooseOutlet, vesselForAnalysis } from '../../jobs/ingest.js';
import { databaseFile } from '../../store/engine.js';
import type { Vessel } from '../../store/vessels.js';
import { READERS, TECHNICIANS_UP } from '../access.js';
import { analysisSettings, idParams, problem, protectedErrors } from '../schemas.js';
import { readUpload } from '../uploads.js';

const json = (reply: FastifyReply, u: Uint8Array) =>
  reply
    .type('application/json; charset=utf-8')
    .send(Buffer.from(u.buffer, u.byteOffset, u.byteLength));

const series = z.object({
  /** ISO 8601 instant of timeS = 0, or null for elapsed-time logs. */
  t0: z.string().nullable(),
  timeS: z.array(z.number()),
  levelM: z.array(z.number()),
  /** 1 where the sample may take part in a fit, 0 where it was set aside (spike, flat line, clipping). */
  keep: z.array(z.number().int()),
});

const inspection = z
  .object({
    head: z.object({ encoding: z.string(), lines: z.array(z.string()) }),
    detected: z.record(z.string(), z.unknown()),
    series,
    settings: analysisSettings,
  })
  .meta({ id: 'Inspection' });

/** The vessel file for the analysis; with several outlets and none named, the first active one (the window hardly depends on it). */
function vesselFile(v: Vessel, outletId: number | undefined): Record<string, unknown> {
  const active = v.outlets.filter((o) => o.retiredAt === null);
  const outlet =
    outletId === undefined && active.length > 1 ? active[0] : chooseOutlet(v, outletId);
  return vesselForAnalysis(v, outlet);
}

export const workbenchRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/vessels/:id/inspect',
    {
      config: { roles: TECHNICIANS_UP },
      schema: {
        tags: ['tests'],
        summary:
          'Read a logger file without storing it: first lines, detected columns, units, time format, the window, the series',
        description:
          'The same multipart body as an upload (file "log", optional "baro", outletId and the AnalysisSettings fields). Nothing is kept.',
        consumes: ['multipart/form-data'],
        params: idParams,
        response: { 200: inspection, 413: problem, 415: problem, 422: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const v = await app.store.vessels.get(request.params.id);
      const up = await readUpload(request);
      const req = {
        log: up.log,
        baro: up.baro,
        vessel: vesselFile(v, up.outletId),
        vesselFileName: v.name,
        settings: up.settings,
      };
      return json(
        reply,
        await app.tasks('inspect', req, {
          transfer: [up.log.bytes, ...(up.baro ? [up.baro.bytes] : [])],
        }),
      );
    },
  );

  app.get(
    '/api/tests/:id/series',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary:
          "A stored test's parsed series at full resolution (reading settings of the given fit, else the test's)",
        params: idParams,
        querystring: z.object({ fit: z.coerce.number().int().positive().optional() }),
        response: {
          200: z.object({ series, detected: z.record(z.string(), z.unknown()) }),
          422: problem,
          ...protectedErrors,
        },
      },
    },
    async (request, reply) => {
      const t = await app.store.tests.get(request.params.id);
      const f =
        request.query.fit === undefined ? null : await app.store.fits.get(request.query.fit);
      const settings = (f && f.testId === t.id ? f.settings : t.settings) as AnalysisSettings;
      const v = await app.store.vessels.get(t.vesselId);
      // a file database: the task thread reads the raw bytes itself (tens of MB stay off this thread)
      const dbPath = databaseFile(app.store.engine);
      const raw = async (sha256: string, fileName: string) =>
        dbPath
          ? { fileName, dbPath, sha256 }
          : { fileName, bytes: await app.store.tests.rawBytes(sha256) };
      const log = await raw(t.sha256, t.fileName);
      const baro = t.baro ? await raw(t.baro.sha256, t.baro.fileName) : undefined;
      const vessel = f && f.testId === t.id ? f.vessel : vesselFile(v, t.outletId ?? undefined);
      return json(
        reply,
        await app.tasks(
          'series',
          { log, baro, vessel, vesselFileName: v.name, settings },
          { transfer: [log, baro].flatMap((r) => (r && 'bytes' in r && r.bytes ? [r.bytes] : [])) },
        ),
      );
    },
  );
};
