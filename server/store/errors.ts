/** What the store refuses; the HTTP layer maps these to 404 and 409 problem+json. */
export class NotFoundError extends Error {
  constructor(
    readonly entity: string,
    readonly id: string | number,
  ) {
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

/** A rule of the records refuses the act itself (four eyes, a site outside a person's limits): 403. */
export class ForbiddenError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ForbiddenError';
  }
}

/** A second upload of the same bytes for the same vessel: 409 naming the first test. */
export class DuplicateUploadError extends ConflictError {
  constructor(
    readonly existingTestId: number,
    message: string,
  ) {
    super(message);
    this.name = 'DuplicateUploadError';
  }
}
