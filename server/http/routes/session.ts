import type { FastifyPluginAsyncZod } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { PUBLIC, READERS } from '../access.js';
import { SESSION_COOKIE } from '../auth.js';
import { HttpProblem } from '../problems.js';
import { problem } from '../schemas.js';

export interface SessionOptions {
  ttlMs: number;
  secureCookie: boolean;
  signInPerMinute: number;
}

const whoami = z.object({
  id: z.number().int(),
  name: z.string(),
  role: z.string(),
  sites: z.array(z.string()).nullable(),
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
      return {
        user: { id: user.id, name: user.name, role: user.role, sites: user.sites },
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
      },
    }),
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
