/**
 * Reports: one fit's report (PDF or canonical JSON), an outlet's history report, and a period
 * export (zip). Readers: every signed-in role may fetch fit and outlet reports (a technician needs
 * the report of the test they ran); exports are for engineers, auditors and admins.
 * Registered by app.ts with `await app.register(reportRoutes);` beside the other route modules.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { reportJson } from '../../core/report/index.js';
import { periodExport } from '../../render/period-export.js';
import { fitReport, outletReport, renderFitReportPdf, renderOutletReportPdf } from '../../render/report-service.js';
import { currentSoftware } from '../../render/software.js';
import { ENGINEERS_AND_AUDITORS, READERS } from '../access.js';
import { HttpProblem } from '../problems.js';
import { idParams, problem, protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';

const binary = z.any().meta({ description: 'the document' });

export const reportRoutes: FastifyPluginAsyncZod = async (app) => {
  app.get(
    '/api/fits/:id/report.pdf',
    { config: { roles: READERS }, schema: { tags: ['reports'], summary: "The fit's report as PDF (deterministic bytes)", params: idParams, response: { 200: binary, ...protectedErrors } } },
    async (request, reply) => {
      const report = fitReport(app.store, request.params.id, currentSoftware());
      const pdf = await renderFitReportPdf(report);
      return reply.type('application/pdf').header('content-disposition', `attachment; filename="fit-${request.params.id}-${report.reportId}.pdf"`).header('x-report-id', report.reportId).send(pdf);
    },
  );

  app.get(
    '/api/fits/:id/report.json',
    { config: { roles: READERS }, schema: { tags: ['reports'], summary: "The fit's report as canonical JSON", params: idParams, response: { 200: binary, ...protectedErrors } } },
    async (request, reply) => {
      const report = fitReport(app.store, request.params.id, currentSoftware());
      return reply.type('application/json').header('x-report-id', report.reportId).send(reportJson(report as unknown as Record<string, unknown>));
    },
  );

  app.get(
    '/api/outlets/:id/report.pdf',
    {
      config: { roles: READERS },
      schema: { tags: ['reports'], summary: "An outlet's approved fits and trend as PDF", params: idParams, querystring: z.object({ asOf: z.string().optional() }), response: { 200: binary, 422: problem, ...protectedErrors } },
    },
    async (request, reply) => {
      const report = outletReport(app.store, request.params.id, currentSoftware(), request.query.asOf);
      const pdf = await renderOutletReportPdf(report);
      return reply.type('application/pdf').header('content-disposition', `attachment; filename="outlet-${request.params.id}-${report.reportId}.pdf"`).header('x-report-id', report.reportId).send(pdf);
    },
  );

  app.post(
    '/api/exports',
    {
      config: { roles: ENGINEERS_AND_AUDITORS, scope: 'listed' },
      schema: {
        tags: ['reports'],
        summary: 'Approved fits of a site, vessel or period: zip of PDF reports, CSV summary, audit excerpt, SHA-256 manifest',
        body: z.object({ site: z.string().optional(), vessel: z.string().optional(), from: z.string().optional(), to: z.string().optional() }),
        response: { 200: binary, 422: problem, ...protectedErrors },
      },
    },
    async (request, reply) => {
      const sites = sitesOf(request);
      if (sites !== null) {
        if (request.body.site === undefined) throw new HttpProblem(403, 'site-forbidden', `a person limited to sites exports one site at a time: give site (${sites.join(', ')})`);
        assertSite(request, request.body.site);
      }
      const r = await periodExport(app.store, request.body, currentSoftware());
      return reply.type('application/zip').header('content-disposition', 'attachment; filename="efflux-export.zip"').send(r.zip);
    },
  );
};
