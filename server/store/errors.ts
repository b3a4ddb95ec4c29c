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

function codeOf(err: unknown): unknown {
  return (err as { code?: unknown } | null)?.code;
}

/**
 * SQLite's "database or disk is full", PostgreSQL's disk_full (53100) and the file system's
 * ENOSPC/EDQUOT: the request was fine, the disk is not.
 */
export function isDiskFull(err: unknown): boolean {
  const code = codeOf(err);
  return code === 'SQLITE_FULL' || code === '53100' || code === 'ENOSPC' || code === 'EDQUOT';
}

/**
 * The same refusals on either engine, by the engine's code (never by message text):
 * a UNIQUE or PRIMARY KEY already holds the value (PostgreSQL 23505).
 */
export function isUniqueViolation(err: unknown): boolean {
  const code = codeOf(err);
  return (
    code === 'SQLITE_CONSTRAINT_UNIQUE' ||
    code === 'SQLITE_CONSTRAINT_PRIMARYKEY' ||
    code === '23505'
  );
}

/** A row points at one that does not exist, or a row still pointed at was deleted (PostgreSQL 23503). */
export function isForeignKeyViolation(err: unknown): boolean {
  const code = codeOf(err);
  return code === 'SQLITE_CONSTRAINT_FOREIGNKEY' || code === '23503';
}

/** A CHECK constraint refused the value (PostgreSQL 23514). */
export function isCheckViolation(err: unknown): boolean {
  const code = codeOf(err);
  return code === 'SQLITE_CONSTRAINT_CHECK' || code === '23514';
}

/**
 * An append-only rule of the schema refused an UPDATE or DELETE (SQLite: a trigger's
 * RAISE(ABORT); PostgreSQL: efflux_refuse(), SQLSTATE 23000). The message is the rule's own text,
 * the same on both engines ("the audit log is append-only").
 */
export function isRuleRefusal(err: unknown): boolean {
  const code = codeOf(err);
  return code === 'SQLITE_CONSTRAINT_TRIGGER' || code === '23000';
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
