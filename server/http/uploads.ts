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

const SETTING_KEYS = ['timeColumn', 'levelColumn', 'unit', 'quantity', 'dateOrder', 'tz', 'delimiter', 'decimal', 'levelTag', 'baroTag', 'sheet', 'window', 'fitInflow', 'fitDatum', 'fitExponent'] as const;

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
  const base = (name ?? '').split(/[\\/]/).pop()!.replace(/[\u0000-\u001f\u007f"]/g, '').trim();
  return base.slice(0, 255) || fallback;
}

export async function readUpload(request: FastifyRequest): Promise<ParsedUpload> {
  if (!request.isMultipart()) throw new HttpProblem(415, 'multipart-required', 'send multipart/form-data with a file field "log"');
  const files: Record<string, RawInput> = {};
  const fields: Record<string, string> = {};
  for await (const part of request.parts()) {
    if (part.type === 'file') {
      const bytes = await part.toBuffer(); // throws 413 past the size limit
      if (part.fieldname !== 'log' && part.fieldname !== 'baro') {
        throw new HttpProblem(400, 'validation', `unexpected file field "${part.fieldname}"`, { errors: [{ path: part.fieldname, message: 'unexpected file' }] });
      }
      if (files[part.fieldname]) throw new HttpProblem(400, 'validation', `file "${part.fieldname}" sent twice`, { errors: [{ path: part.fieldname, message: 'sent twice' }] });
      files[part.fieldname] = { bytes, fileName: cleanName(part.filename, `${part.fieldname}.csv`) };
    } else {
      fields[part.fieldname] = String(part.value);
    }
  }
  if (!files.log) throw new HttpProblem(400, 'validation', 'the file field "log" is missing', { errors: [{ path: 'log', message: 'required' }] });
  if (files.log.bytes.byteLength === 0) throw new HttpProblem(400, 'validation', 'the log file is empty', { errors: [{ path: 'log', message: 'empty' }] });
  const parsed = uploadFields.safeParse(fields);
  if (!parsed.success) throw refuseFields(parsed.error.issues);
  const f = parsed.data;
  const settings: AnalysisSettings = {};
  for (const k of SETTING_KEYS) if (f[k] !== undefined) (settings as Record<string, unknown>)[k] = f[k];
  return { log: files.log, baro: files.baro, settings, outletId: f.outletId, operator: f.operator, loggerId: f.loggerId, testedAt: f.testedAt, notes: f.notes, allowDuplicate: f.allowDuplicate };
}
