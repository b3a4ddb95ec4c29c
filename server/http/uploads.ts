/**
 * Reads the multipart body of an upload: file `log`, optional file `baro`, and text fields for the
 * analysis settings and the test's metadata. Every file stream is consumed (the size limit fires
 * while it is read); field values are checked with zod like any other request.
 */
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import type { AnalysisSettings } from '../core/analysis-contract.js';
import { nameText, noteText, tagText } from '../core/limits.js';
import type { RawInput } from '../store/tests.js';
import { HttpProblem, refuseFields } from './problems.js';

const bool = z.enum(['true', 'false']).transform((s) => s === 'true');

/** Multipart text fields (all strings on the wire). */
export const uploadFields = z
  .object({
    outletId: z.coerce.number().int().positive(),
    operator: nameText(),
    loggerId: nameText(),
    testedAt: tagText(),
    notes: noteText(),
    timeColumn: nameText().min(1),
    levelColumn: nameText().min(1),
    unit: tagText().min(1),
    quantity: z.enum(['level', 'gauge-pressure', 'absolute-pressure', 'distance-from-top']),
    dateOrder: z.enum(['dmy', 'mdy', 'ymd']),
    tz: tagText().min(1),
    delimiter: z.string().min(1).max(3),
    decimal: z.enum(['.', ',']),
    levelTag: tagText().min(1),
    baroTag: tagText().min(1),
    sheet: tagText().min(1),
    window: tagText().min(1),
    fitInflow: bool,
    fitDatum: bool,
    fitExponent: bool,
    allowDuplicate: bool,
  })
  .partial()
  .strict();

const SETTING_KEYS = [
  'timeColumn',
  'levelColumn',
  'unit',
  'quantity',
  'dateOrder',
  'tz',
  'delimiter',
  'decimal',
  'levelTag',
  'baroTag',
  'sheet',
  'window',
  'fitInflow',
  'fitDatum',
  'fitExponent',
] as const;

export interface ParsedUpload {
  log: RawInput;
  baro?: RawInput;
  settings: AnalysisSettings;
  outletId?: number;
  operator?: string;
  loggerId?: string;
  testedAt?: string;
  notes?: string;
  allowDuplicate?: boolean;
}

/** The name as the client gave it, stripped of any folder part and control characters. */
function cleanName(name: string | undefined, fallback: string): string {
  const base = (name ?? '')
    .split(/[\\/]/)
    .pop()!
    .replace(/[\u0000-\u001f\u007f"]/g, '')
    .trim();
  return base.slice(0, 255) || fallback;
}

/** Errors of our own (413 size, 400 field) pass; anything the multipart reader throws is the body's fault. */
function malformed(e: unknown): unknown {
  if (e instanceof HttpProblem) return e;
  const fe = e as { statusCode?: number; code?: string; message?: string };
  if (
    fe.code === 'FST_REQ_FILE_TOO_LARGE' ||
    fe.code === 'FST_PARTS_LIMIT' ||
    fe.code === 'FST_FILES_LIMIT' ||
    fe.code === 'FST_FIELDS_LIMIT'
  )
    return e;
  if (typeof fe.statusCode === 'number' && fe.statusCode >= 400 && fe.statusCode < 500) return e;
  if (fe.code === 'ECONNRESET' || fe.code === 'ERR_STREAM_PREMATURE_CLOSE')
    return new HttpProblem(400, 'malformed-multipart', 'the upload was cut off before its end');
  const why = (fe.message ?? String(e)).replace(/^Multipart: /, '').slice(0, 200);
  return new HttpProblem(
    400,
    'malformed-multipart',
    `the multipart body could not be read (${why}); send multipart/form-data with its boundary and closing delimiter`,
  );
}

async function readParts(
  request: FastifyRequest,
  files: Record<string, RawInput>,
  fields: Record<string, string>,
): Promise<void> {
  for await (const part of request.parts()) {
    if (part.type === 'file') {
      const bytes = await part.toBuffer(); // throws 413 past the size limit
      if (part.fieldname !== 'log' && part.fieldname !== 'baro') {
        throw new HttpProblem(400, 'validation', `unexpected file field "${part.fieldname}"`, {
          errors: [{ path: part.fieldname, message: 'unexpected file' }],
        });
      }
      if (files[part.fieldname])
        throw new HttpProblem(400, 'validation', `file "${part.fieldname}" sent twice`, {
          errors: [{ path: part.fieldname, message: 'sent twice' }],
        });
      files[part.fieldname] = {
        bytes,
        fileName: cleanName(part.filename, `${part.fieldname}.csv`),
      };
    } else {
      fields[part.fieldname] = String(part.value);
    }
  }
}

export async function readUpload(request: FastifyRequest): Promise<ParsedUpload> {
  if (!request.isMultipart())
    throw new HttpProblem(
      415,
      'multipart-required',
      'send multipart/form-data with a file field "log"',
    );
  const files: Record<string, RawInput> = {};
  const fields: Record<string, string> = {};
  try {
    await readParts(request, files, fields);
  } catch (e) {
    throw malformed(e);
  }
  if (!files.log)
    throw new HttpProblem(400, 'validation', 'the file field "log" is missing', {
      errors: [{ path: 'log', message: 'required' }],
    });
  if (files.log.bytes.byteLength === 0)
    throw new HttpProblem(400, 'validation', 'the log file is empty', {
      errors: [{ path: 'log', message: 'empty' }],
    });
  const parsed = uploadFields.safeParse(fields);
  if (!parsed.success) throw refuseFields(parsed.error.issues);
  const f = parsed.data;
  const settings: AnalysisSettings = {};
  for (const k of SETTING_KEYS)
    if (f[k] !== undefined) (settings as Record<string, unknown>)[k] = f[k];
  return {
    log: files.log,
    baro: files.baro,
    settings,
    outletId: f.outletId,
    operator: f.operator,
    loggerId: f.loggerId,
    testedAt: f.testedAt,
    notes: f.notes,
    allowDuplicate: f.allowDuplicate,
  };
}
