/**
 * What the web workbench needs beside the resource routes: a look at a logger file before anything
 * is stored (the first lines, what the reader detected, the whole series for the window chart),
 * and the parsed series of a stored test at full resolution (the fit view draws the window on it).
 * Both run the same pure reader as a fit (prepareDrainTest), so what is shown is what is fitted.
 * Reading runs on the event loop: a million-row file takes a few hundred milliseconds.
 * The module's one export is the plugin: `await app.register(workbenchRoutes)`.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { AnalysisSettings } from '../../core/analysis-contract.js';
import { detectedSummary, expandWorkbook, prepareDrainTest, type PreparedTest } from '../../core/analyze.js';
import { decodeHead, detectEncoding, NotUtf8 } from '../../core/ingest/decode.js';
import { chooseOutlet, vesselForAnalysis } from '../../jobs/ingest.js';
import type { Vessel } from '../../store/vessels.js';
import { READERS, TECHNICIANS_UP } from '../access.js';
import { analysisSettings, idParams, problem, protectedErrors } from '../schemas.js';
import { readUpload } from '../uploads.js';

const HEAD_LINES = 25;
const HEAD_BYTES = 16 * 1024;

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

/** The first lines of the file as text, for the preview table (never used for reading). */
function headLines(bytes: Uint8Array, fileName: string): { encoding: string; lines: string[] } {
  let guess = detectEncoding(bytes);
  let text: string;
  try {
    text = decodeHead(bytes, guess, HEAD_BYTES, fileName);
  } catch (e) {
    if (!(e instanceof NotUtf8)) throw e;
    guess = { encoding: 'windows-1252', bomBytes: 0, reason: 'not valid UTF-8' };
    text = decodeHead(bytes, guess, HEAD_BYTES, fileName);
  }
  const lines = text.replace(/\r\n?/g, '\n').split('\n').slice(0, HEAD_LINES);
  if (bytes.length > HEAD_BYTES && lines.length === HEAD_LINES) return { encoding: guess.encoding, lines };
  return { encoding: guess.encoding, lines: lines.filter((l, i) => l !== '' || i < lines.length - 1) };
}

function seriesOf(p: PreparedTest): z.infer<typeof series> {
  const s = p.series;
  return {
    t0: s.t0EpochMs === null ? null : new Date(s.t0EpochMs).toISOString(),
    timeS: Array.from(s.timeS),
    levelM: Array.from(s.levelM),
    keep: Array.from(p.choice.keep),
  };
}

/** The vessel file for the analysis; with several outlets and none named, the first active one (the window hardly depends on it). */
function vesselFile(v: Vessel, outletId: number | undefined): Record<string, unknown> {
  const active = v.outlets.filter((o) => o.retiredAt === null);
  const outlet = outletId === undefined && active.length > 1 ? active[0] : chooseOutlet(v, outletId);
  return vesselForAnalysis(v, outlet);
}

export const workbenchRoutes: FastifyPluginAsyncZod = async (app) => {
  app.post(
    '/api/vessels/:id/inspect',
    {
      config: { roles: TECHNICIANS_UP },
      schema: {
        tags: ['tests'],
        summary: 'Read a logger file without storing it: first lines, detected columns, units, time format, the window, the series',
        description: 'The same multipart body as an upload (file "log", optional "baro", outletId and the AnalysisSettings fields). Nothing is kept.',
        consumes: ['multipart/form-data'],
        params: idParams,
        response: { 200: inspection, 413: problem, 415: problem, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const v = app.store.vessels.get(request.params.id);
      const up = await readUpload(request);
      const req = await expandWorkbook({ log: up.log, baro: up.baro, vessel: vesselFile(v, up.outletId), vesselFileName: v.name, settings: up.settings });
      const prepared = prepareDrainTest(req);
      // a workbook's first lines are those of its sheet as text
      return { head: headLines(req.log.bytes, up.log.fileName), detected: detectedSummary(prepared), series: seriesOf(prepared), settings: up.settings };
    },
  );

  app.get(
    '/api/tests/:id/series',
    {
      config: { roles: READERS },
      schema: {
        tags: ['tests'],
        summary: "A stored test's parsed series at full resolution (reading settings of the given fit, else the test's)",
        params: idParams,
        querystring: z.object({ fit: z.coerce.number().int().positive().optional() }),
        response: { 200: z.object({ series, detected: z.record(z.string(), z.unknown()) }), 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const t = app.store.tests.get(request.params.id);
      const f = request.query.fit === undefined ? null : app.store.fits.get(request.query.fit);
      const settings = (f && f.testId === t.id ? f.settings : t.settings) as AnalysisSettings;
      const v = app.store.vessels.get(t.vesselId);
      const log = { bytes: app.store.tests.rawBytes(t.sha256), fileName: t.fileName };
      const baro = t.baro ? { bytes: app.store.tests.rawBytes(t.baro.sha256), fileName: t.baro.fileName } : undefined;
      const vessel = f && f.testId === t.id ? f.vessel : vesselFile(v, t.outletId ?? undefined);
      const prepared = prepareDrainTest(await expandWorkbook({ log, baro, vessel, vesselFileName: v.name, settings }));
      return { series: seriesOf(prepared), detected: detectedSummary(prepared) };
    },
  );
};
