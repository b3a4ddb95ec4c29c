/**
 * Cookie-authenticated writes only from the workbench's own origin. A browser sends the session
 * cookie with any request to this host (SameSite ignores ports: a page on another port of the same
 * host is "same-site"), so every state-changing request that rides on the cookie must show it came
 * from this origin: its `Origin` header equals ours, or, without Origin, `Sec-Fetch-Site:
 * same-origin`. Otherwise 403. Bearer-token requests carry no ambient credential and are not
 * checked. (An Origin/Sec-Fetch-Site check rather than a CSRF-token plugin: the workbench sends
 * fetch requests only, which always carry Origin on POST/PUT/DELETE, and no token plumbing is needed.)
 */
import type { FastifyRequest } from 'fastify';
import { HttpProblem } from './problems.js';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/** scheme://host[:port] in lower case, without the scheme's default port (RFC 6454 serialises it so). */
function normal(origin: string): string {
  return origin
    .toLowerCase()
    .replace(/^(http:\/\/[^/]+):80$/, '$1')
    .replace(/^(https:\/\/[^/]+):443$/, '$1');
}

/** This service's own origin as the browser names it (scheme, host and port of the request). */
export function ownOrigin(request: FastifyRequest): string {
  return normal(`${request.protocol}://${request.headers.host ?? ''}`);
}

/**
 * Throws 403 when a cookie-authenticated request changes state from somewhere else. `extra` are
 * origins also accepted (EFFLUX_ORIGINS, e.g. the public https address behind a reverse proxy).
 */
export function assertSameOrigin(request: FastifyRequest, extra: readonly string[]): void {
  if (SAFE.has(request.method)) return;
  const origin = request.headers.origin;
  if (origin !== undefined) {
    const o = normal(origin);
    if (o === ownOrigin(request) || extra.some((x) => normal(x) === o)) return;
    throw new HttpProblem(
      403,
      'foreign-origin',
      `a request signed in by the session cookie must come from the workbench's own origin, not ${origin}`,
    );
  }
  if (request.headers['sec-fetch-site'] === 'same-origin') return;
  throw new HttpProblem(
    403,
    'foreign-origin',
    'a request signed in by the session cookie must come from the workbench (no Origin or Sec-Fetch-Site: same-origin header)',
  );
}
