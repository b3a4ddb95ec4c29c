import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { PUBLIC, READERS } from '../access.js';
import { SESSION_COOKIE } from '../auth.js';
import { HttpProblem } from '../problems.js';
import { problem } from '../schemas.js';
import { UNIT_SYSTEMS } from '../../core/format/unit-system.js';

export interface SessionOptions {
  ttlMs: number;
  secureCookie: boolean;
  signInPerMinute: number;
}

const displayUnits = z.enum(UNIT_SYSTEMS);

const whoami = z.object({
  id: z.number().int(),
  name: z.string(),
  role: z.string(),
  sites: z.array(z.string()).nullable(),
  /** The units this person reads results in (the workbench and their PDFs); JSON stays SI. */
  displayUnits,
});

/** Sign-in for the browser: a token in, an httpOnly SameSite=Strict cookie out. */
export const sessionRoutes: FastifyPluginAsyncZod<SessionOptions> = async (app, opts) => {
  app.post(
    '/api/session',
    {
      config: { roles: PUBLIC, rateLimit: { max: opts.signInPerMinute, timeWindow: '1 minute' } },
      schema: {
        tags: ['session'],
        summary: 'Sign in with an API token; sets the session cookie',
        body: z.object({ token: z.string().min(1).max(200) }),
        response: {
          201: z.object({ user: whoami, expiresAt: z.string() }),
          401: problem,
          429: problem,
        },
      },
    },
    async (request, reply) => {
      const signedIn = await app.store.users.signIn(request.body.token, opts.ttlMs);
      if (!signedIn) throw new HttpProblem(401, 'unauthenticated', 'the token is not valid');
      const { user, secret, expiresAt } = signedIn;
      reply.setCookie(SESSION_COOKIE, secret, {
        httpOnly: true,
        sameSite: 'strict',
        secure: opts.secureCookie,
        path: '/api',
        expires: new Date(expiresAt),
      });
      reply.code(201);
      const prefs = await app.store.preferences.get(user.id);
      return {
        user: {
          id: user.id,
          name: user.name,
          role: user.role,
          sites: user.sites,
          displayUnits: prefs.displayUnits,
        },
        expiresAt,
      };
    },
  );

  app.get(
    '/api/session',
    {
      config: { roles: READERS, scope: 'none' },
      schema: {
        tags: ['session'],
        summary: 'Who is signed in',
        response: { 200: z.object({ user: whoami }) },
      },
    },
    async (request) => ({
      user: {
        id: request.user!.id,
        name: request.user!.name,
        role: request.user!.role,
        sites: request.user!.sites,
        displayUnits: (await app.store.preferences.get(request.user!.id)).displayUnits,
      },
    }),
  );

  app.put(
    '/api/session/preferences',
    {
      config: { roles: READERS, scope: 'none' },
      schema: {
        tags: ['session'],
        summary: "The signed-in person's display preferences (units: si or us)",
        body: z.object({ displayUnits }),
        response: { 200: z.object({ displayUnits }), 400: problem },
      },
    },
    async (request) =>
      app.store.preferences.setDisplayUnits(request.user!.id, request.body.displayUnits),
  );

  app.delete(
    '/api/session',
    {
      config: { roles: READERS, scope: 'none' },
      schema: {
        tags: ['session'],
        summary: 'Sign out (ends the cookie session)',
        response: { 204: z.null() },
      },
    },
    async (request, reply) => {
      const secret = request.cookies[SESSION_COOKIE];
      if (secret) await app.store.users.closeSession(request.user!, secret);
      reply.clearCookie(SESSION_COOKIE, { path: '/api' });
      reply.code(204);
      return null;
    },
  );
};
