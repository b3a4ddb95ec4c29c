/** PostgreSQL connection URLs (EFFLUX_DATABASE_URL): recognised, and shown without their password. */

/** postgres:// or postgresql:// (node-postgres reads both). */
export function isPostgresUrl(url: string): boolean {
  return /^postgres(ql)?:\/\//i.test(url.trim());
}

/** The URL with its password (user:PASSWORD@ or ?password=) replaced by ***, for logs, messages and the ready text. */
export function redactDatabaseUrl(url: string): string {
  return url
    .replace(/^([a-z][\w+.-]*:\/\/[^:/@?#]*):[^/?#]*@/i, '$1:***@')
    .replace(/([?&]password=)[^&#]*/gi, '$1***');
}
