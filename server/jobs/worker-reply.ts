import type { AnalysisOutcome } from '../core/analysis-contract.js';
import { InputError } from '../core/errors.js';

/**
 * What crosses the worker boundary. Errors are flattened to plain fields on purpose: structured
 * clone keeps neither the InputError class nor its file/line/field, and a thrown task error
 * reaches the main thread as a bare Error.
 */
export type WorkerReply =
  | { ok: true; outcome: AnalysisOutcome; engineMs: number }
  | { ok: false; error: SerialisedError; engineMs?: number };

export interface SerialisedError {
  name: string;
  message: string;
  file?: string;
  line?: number;
  field?: string;
}

export function serialiseError(e: unknown): SerialisedError {
  // By name, not instanceof: the engine may have been loaded as a separate module graph (tsx's
  // tsImport in development), with its own copy of the InputError class.
  if (e instanceof InputError || (e instanceof Error && e.name === 'InputError')) {
    const x = e as InputError;
    return { name: 'InputError', message: x.message, file: x.file, line: x.line, field: x.field };
  }
  if (e instanceof Error) return { name: e.name, message: e.message };
  return { name: 'Error', message: String(e) };
}

/** The analysis engine is not there (not built yet): the service says so instead of failing oddly. */
export class EngineUnavailableError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'EngineUnavailableError';
  }
}

export function reviveError(s: SerialisedError): Error {
  if (s.name === 'InputError')
    return new InputError(s.message, { file: s.file, line: s.line, field: s.field });
  if (s.name === 'EngineUnavailableError') return new EngineUnavailableError(s.message);
  const e = new Error(s.message);
  e.name = s.name;
  return e;
}
