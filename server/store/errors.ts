/** What the store refuses; the HTTP layer maps these to 404 and 409 problem+json. */
export class NotFoundError extends Error {
  constructor(readonly entity: string, readonly id: string | number) {
    super(`${entity} ${id} not found`);
    this.name = 'NotFoundError';
  }
}

export class ConflictError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ConflictError';
  }
}

/** SQLite's "database or disk is full" and the file system's ENOSPC/EDQUOT: the request was fine, the disk is not. */
export function isDiskFull(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code;
  return code === 'SQLITE_FULL' || code === 'ENOSPC' || code === 'EDQUOT';
}
