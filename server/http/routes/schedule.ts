/**
 * Sites' clocks and test intervals, outlets' own intervals, and the list of tests that fall due
 * (issue 19): GET/PUT /api/sites/:name/clock, PUT /api/outlets/:id/interval, GET /api/due.
 */
import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { InputError } from '../../core/errors.js';
import { checkTimeZone } from '../../core/ingest/zone.js';
import { checkIntervalDays, MAX_TEST_INTERVAL_DAYS } from '../../core/trend/index.js';
import { dueList, scheduleOf } from '../../jobs/due.js';
import { schedule } from '../../jobs/trend-views.js';
import { actorOf } from '../../store/users.js';
import { ENGINEERS_UP, READERS } from '../access.js';
import { idParams, problem, protectedErrors } from '../schemas.js';
import { assertSite, sitesOf } from '../site-scope.js';

const siteClock = z
  .object({
    id: z.number().int(),
    name: z.string(),
    timeZone: z.string(),
    testIntervalDays: z.number().int(),
  })
  .meta({
    id: 'SiteClock',
    description:
      "A site's time zone (IANA; local log times without an offset are read in it unless the upload names another) and its default test interval in days",
  });

const intervalDays = z.number().int().min(1).max(MAX_TEST_INTERVAL_DAYS);

const dueItem = schedule.extend({
  outletId: z.number().int(),
  outletKey: z.string(),
  vesselId: z.number().int(),
  vesselName: z.string(),
  site: z.string(),
});

export const scheduleRoutes: FastifyPluginAsyncZod = async (app) => {
  const siteParams = z.object({ name: z.string().min(1).max(200) });

  app.get(
    '/api/sites/:name/clock',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['schedule'],
        summary: "A site's time zone and default test interval",
        params: siteParams,
        response: { 200: siteClock, ...protectedErrors },
      },
    },
    async (request) => {
      assertSite(request, request.params.name);
      return await app.store.schedule.site(request.params.name);
    },
  );

  app.put(
    '/api/sites/:name/clock',
    {
      config: { roles: ENGINEERS_UP, scope: 'listed' },
      schema: {
        tags: ['schedule'],
        summary:
          "Set a site's time zone (IANA name, checked) and/or default test interval in days (audited)",
        params: siteParams,
        body: z
          .object({
            timeZone: z.string().min(1).max(64).optional(),
            testIntervalDays: intervalDays.optional(),
          })
          .strict(),
        response: { 200: siteClock, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      assertSite(request, request.params.name);
      const b = request.body;
      if (b.timeZone === undefined && b.testIntervalDays === undefined)
        throw new InputError('give timeZone, testIntervalDays or both', { field: 'timeZone' });
      return await app.store.schedule.setSite(actorOf(request.user!), request.params.name, {
        ...(b.timeZone !== undefined ? { timeZone: checkTimeZone(b.timeZone) } : {}),
        ...(b.testIntervalDays !== undefined
          ? { testIntervalDays: checkIntervalDays(b.testIntervalDays) }
          : {}),
      });
    },
  );

  app.put(
    '/api/outlets/:id/interval',
    {
      config: { roles: ENGINEERS_UP, scope: 'outlet' },
      schema: {
        tags: ['schedule'],
        summary:
          "Set an outlet's own test interval in days (null: follow its site's); answers its schedule now",
        params: idParams,
        body: z.object({ testIntervalDays: intervalDays.nullable() }).strict(),
        response: { 200: schedule, 422: problem, ...protectedErrors },
      },
    },
    async (request) => {
      const id = request.params.id;
      await app.store.schedule.outletInterval(id); // 404 when there is no such outlet
      await app.store.schedule.setOutletInterval(
        actorOf(request.user!),
        id,
        request.body.testIntervalDays,
      );
      const [row] = await app.store.schedule.outlets(id);
      return scheduleOf(row, app.clockMs());
    },
  );

  app.get(
    '/api/due',
    {
      config: { roles: READERS, scope: 'listed' },
      schema: {
        tags: ['schedule'],
        summary:
          'Outlets overdue for a drain test or due within `within` days (default 30), soonest first, with the age of each latest test',
        querystring: z.object({
          site: z.string().min(1).max(200).optional(),
          within: z.coerce.number().int().min(0).max(MAX_TEST_INTERVAL_DAYS).optional(),
          asOf: z.iso
            .date()
            .or(z.iso.datetime({ offset: true }))
            .optional(),
        }),
        response: {
          200: z
            .object({
              asOf: z.string(),
              nowMs: z.number(),
              sites: z.array(z.string()),
              withinDays: z.number().int(),
              items: z.array(dueItem),
            })
            .meta({ id: 'DueList' }),
          ...protectedErrors,
        },
      },
    },
    async (request) => {
      const q = request.query;
      return await dueList(
        app.store,
        { site: q.site, sites: sitesOf(request), withinDays: q.within },
        q.asOf === undefined ? app.clockMs() : Date.parse(q.asOf),
      );
    },
  );
};
