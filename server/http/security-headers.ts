/**
 * Security headers computed once. @fastify/helmet builds its middleware anew on every request
 * (it re-parses the CSP directives each time: a few per cent of a small read); the headers it
 * sets depend only on its options, so they are taken once from the plugin itself, on a throwaway
 * instance, and set by one hook. The same plugin, the same options, the same headers.
 */
import helmet, { type FastifyHelmetOptions } from '@fastify/helmet';
import Fastify from 'fastify';

export async function securityHeaders(options: FastifyHelmetOptions): Promise<Record<string, string>> {
  const withHelmet = Fastify();
  await withHelmet.register(helmet, options);
  const plain = Fastify();
  for (const app of [withHelmet, plain]) app.get('/', async () => 'ok');
  const [a, b] = await Promise.all([withHelmet.inject('/'), plain.inject('/')]);
  await Promise.all([withHelmet.close(), plain.close()]);
  const headers: Record<string, string> = {};
  for (const [name, value] of Object.entries(a.headers)) {
    if (!(name in b.headers) && value !== undefined) headers[name] = String(value);
  }
  if (!headers['content-security-policy']) throw new Error('security headers: helmet set no Content-Security-Policy');
  return headers;
}
