/**
 * Sending answers the store keeps ready as bytes (ReadyText): no serialiser runs (the bytes are
 * the stored JSON, shaped like the route's schema, as the store's tests check), an ETag names
 * the version, and a client that already holds it gets 304 with no body.
 */
import type { FastifyReply, FastifyRequest } from 'fastify';
import type { ReadyText } from '../store/read-cache.js';

/** RFC 9110 §13.1.2: If-None-Match uses the weak comparison; "*" matches any current version. */
export function matchesIfNoneMatch(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  for (const raw of header.split(',')) {
    const tag = raw.trim();
    if (tag === '*' || tag === etag || tag === `W/${etag}`) return true;
  }
  return false;
}

export function sendReadyText(
  request: FastifyRequest,
  reply: FastifyReply,
  text: ReadyText,
): FastifyReply {
  const etag = `"${text.digest}"`;
  // private: answers depend on credentials; no-cache: a fit's status can change, so ask each time
  reply.header('etag', etag).header('cache-control', 'private, no-cache');
  if (matchesIfNoneMatch(request.headers['if-none-match'], etag)) return reply.code(304).send();
  return reply.type('application/json; charset=utf-8').send(text.body);
}
