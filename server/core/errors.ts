/**
 * A refusal of bad input, with where the problem is. Every layer that reads something a person
 * supplied throws this (never a bare Error), so the CLI can exit 2 with one line and the service
 * can answer 4xx problem+json, without a stack trace either way.
 */
export interface InputLocation {
  /** File name as the person gave it (not a resolved path). */
  file?: string;
  /** 1-based line number in that file. */
  line?: number;
  /** Field or column name, or a dotted path into a JSON document (e.g. "shape.diameterM"). */
  field?: string;
}

export class InputError extends Error {
  readonly file?: string;
  readonly line?: number;
  readonly field?: string;

  constructor(message: string, where: InputLocation = {}) {
    super(message);
    this.name = 'InputError';
    this.file = where.file;
    this.line = where.line;
    this.field = where.field;
  }

  /** One line for a terminal: "log.csv, line 12, field level: not a number". */
  toLine(): string {
    const parts: string[] = [];
    if (this.file) parts.push(this.file);
    if (this.line !== undefined) parts.push(`line ${this.line}`);
    if (this.field) parts.push(`field ${this.field}`);
    return parts.length ? `${parts.join(', ')}: ${this.message}` : this.message;
  }
}

export function isInputError(e: unknown): e is InputError {
  return e instanceof InputError;
}
