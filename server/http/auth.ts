/**
 * Credentials: `Authorization: Bearer <token>` or the session cookie set by POST /api/session.
 * Each route declares its roles (access.ts); this hook answers 401 without valid credentials and
 * 403 when the role may not act.
 */
import type { FastifyInstance } from 'fastify';
import type { Store } from '../store/index.js';
import type { User } from '../store/users.js';
import { assertSameOrigin } from './origin.js';
import { HttpProblem } from './problems.js';

export const SESSION_COOKIE = 'efflux_session';

declare module 'fastify' {
  interface FastifyRequest {
    user: User | null;
  }
}

export async function identify(
  store: Store,
  authorization: string | undefined,
  cookie: string | undefined,
): Promise<User | null | 'bad'> {
  if (authorization !== undefined) {
    const m = /^Bearer\s+(\S+)$/i.exec(authorization);
    if (!m) return 'bad';
    return (await store.users.byToken(m[1])) ?? 'bad';
  }
  if (cookie) return (await store.users.bySession(cookie)) ?? 'bad';
  return null;
}

export function installAuth(
  app: FastifyInstance,
  store: Store,
  extraOrigins: readonly string[] = [],
): void {
  app.decorateRequest('user', null);
  app.addHook('onRequest', async (request) => {
    const roles = request.routeOptions.config.roles;
    if (roles === undefined || roles === 'public') {
      // sign-in from a foreign page (login CSRF) is refused as well
      if (request.headers.origin !== undefined && request.routeOptions.url === '/api/session')
        assertSameOrigin(request, extraOrigins);
      return; // not-found handler, docs, static files
    }
    const who = await identify(
      store,
      request.headers.authorization,
      request.cookies?.[SESSION_COOKIE],
    );
    if (who === null)
      throw new HttpProblem(
        401,
        'unauthenticated',
        'credentials required: a Bearer token or a session',
      );
    if (who === 'bad')
      throw new HttpProblem(401, 'unauthenticated', 'the token or session is not valid');
    // the cookie is sent by the browser whatever page asks: writes must come from our own origin
    if (request.headers.authorization === undefined) assertSameOrigin(request, extraOrigins);
    if (!roles.includes(who.role))
      throw new HttpProblem(
        403,
        'forbidden',
        `role ${who.role} may not ${request.method} this resource`,
      );
    request.user = who;
  });
}
