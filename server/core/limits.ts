/**
 * How long a free-text or name field may be, everywhere a person or a program sends one (vessel
 * and system files, upload fields, reviews, maintenance events, query filters). One place, so the
 * service, the CLI and the files agree. Past a limit the input is refused (422 naming the field,
 * exit 2 in the CLI), never cut: a truncated note would be stored as if it had been written so.
 * Sizes: a name or label fits on a report line; a note is a page of text; a tag is a short token
 * (unit, time zone, column key, outlet id). Why a limit at all: text is laid out in PDFs, kept in
 * the append-only history for ever, and sent back in every read of its record.
 */
import { z } from 'zod';

export const TEXT_LIMITS = {
  /** Names and labels: vessel, site, operator, logger, column header, system, person. */
  name: 200,
  /** Notes and comments: maintenance notes, test notes, review comments. */
  note: 10_000,
  /** Short tokens: outlet and vessel ids in files, units, time zones, windows, dates, filter words. */
  tag: 64,
  /** A file path named inside a file (a system file's flow log). */
  path: 1024,
} as const;

export type TextKind = keyof typeof TEXT_LIMITS;

/** A string of at most the limit of its kind (zod); the message names the limit, not the value. */
export function limitedText(kind: TextKind): z.ZodString {
  const max = TEXT_LIMITS[kind];
  return z.string().max(max, `is longer than ${max} characters`);
}

export const nameText = () => limitedText('name');
export const noteText = () => limitedText('note');
export const tagText = () => limitedText('tag');
