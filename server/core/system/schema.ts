import { z } from 'zod';
import { InputError } from '../errors.js';
import { limitedText, nameText, noteText, tagText } from '../limits.js';
import { flowFactorToM3s } from '../units/flow.js';
import { parseFlow } from '../units/parse.js';
import { describeIssue } from '../vessel/issues.js';
import { jsonErrorOffset, lineOf } from '../vessel/json-position.js';
import { validateVessel, type VesselSpec } from '../vessel/schema.js';

/**
 * The system file: several vessel-file bodies, each with an id, where its outlet discharges to
 * and how (free jet or submerged), plus the inflows. Each vessel's own fields go through the
 * vessel-file schema unchanged, so a vessel can be copied between the two kinds of file.
 */
const CONNECTIONS = ['free', 'submerged'] as const;
export type Connection = (typeof CONNECTIONS)[number];

/** The fields a vessel has only inside a system file. */
const linkSchema = z.object({
  id: tagText().min(1),
  dischargesTo: tagText().min(1).nullable(),
  connection: z.enum(CONNECTIONS),
  /** Elevation of the vessel's lowest interior point on a common site datum, m (submerged links need it). */
  baseElevationM: z.number().optional(),
  /** A known effective area Cd·a, m², for `steady` and `linearize` without a fit. */
  effectiveAreaM2: z.number().positive().optional(),
  /** A known Cd (with the outlet's bore), the alternative to effectiveAreaM2. */
  dischargeCoefficient: z.number().positive().max(1.5).optional(),
});
const SYSTEM_ONLY = [
  'id',
  'dischargesTo',
  'connection',
  'baseElevationM',
  'effectiveAreaM2',
  'dischargeCoefficient',
] as const;

const inflowSchema = z.union([
  z.strictObject({
    to: tagText().min(1),
    constant: z.union([z.number().min(0), tagText().min(1)]),
  }),
  // a flow log (time and flow columns); its path is relative to the system file; unit if its header gives none
  z.strictObject({
    to: tagText().min(1),
    log: limitedText('path').min(1),
    unit: tagText().min(1).optional(),
  }),
]);

const systemObject = z.strictObject({
  name: nameText().min(1),
  site: nameText().optional(),
  notes: noteText().optional(),
  vessels: z.array(z.record(z.string(), z.unknown())).min(1).max(50),
  inflows: z.array(inflowSchema).optional(),
});

export interface SystemVessel extends VesselSpec {
  id: string;
  dischargesTo: string | null;
  connection: Connection;
  baseElevationM?: number;
  effectiveAreaM2?: number;
  dischargeCoefficient?: number;
}

export type SystemInflow =
  | { to: string; constantM3S: number }
  | { to: string; log: string; unit?: string };

export interface SystemSpec {
  name: string;
  site?: string;
  notes?: string;
  vessels: SystemVessel[];
  inflows: SystemInflow[];
}

function refuse(message: string, field: string, file?: string): never {
  throw new InputError(message, { file, field });
}

/** Check a parsed system document; the first problem becomes one InputError naming its field. */
export function validateSystem(value: unknown, fileName?: string): SystemSpec {
  const r = systemObject.safeParse(value);
  if (!r.success) {
    const { field, message } = describeIssue(r.error.issues[0], value);
    throw new InputError(message, { file: fileName, field: field === '' ? undefined : field });
  }
  const vessels: SystemVessel[] = r.data.vessels.map((raw, i) => {
    const link = linkSchema.safeParse(raw);
    if (!link.success) {
      const { field, message } = describeIssue(link.error.issues[0], value, ['vessels', i]);
      throw new InputError(message, { file: fileName, field });
    }
    const body: Record<string, unknown> = { ...raw };
    for (const k of SYSTEM_ONLY) delete body[k];
    let spec: VesselSpec;
    try {
      spec = validateVessel(body, fileName);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      throw new InputError(e.message, {
        file: fileName,
        field: e.field ? `vessels.${i}.${e.field}` : `vessels.${i}`,
      });
    }
    if (link.data.effectiveAreaM2 !== undefined && link.data.dischargeCoefficient !== undefined) {
      refuse(
        'give effectiveAreaM2 or dischargeCoefficient, not both',
        `vessels.${i}.dischargeCoefficient`,
        fileName,
      );
    }
    return { ...spec, ...link.data };
  });
  const index = new Map<string, number>();
  vessels.forEach((v, i) => {
    if (index.has(v.id))
      refuse(
        `id "${v.id}" is used twice (also vessels.${index.get(v.id)})`,
        `vessels.${i}.id`,
        fileName,
      );
    index.set(v.id, i);
  });
  vessels.forEach((v, i) => {
    if (v.dischargesTo === null) {
      if (v.connection === 'submerged')
        refuse(
          'a submerged outlet needs a receiving vessel (dischargesTo)',
          `vessels.${i}.connection`,
          fileName,
        );
      return;
    }
    const j = index.get(v.dischargesTo);
    if (j === undefined)
      refuse(`no vessel has id "${v.dischargesTo}"`, `vessels.${i}.dischargesTo`, fileName);
    if (j === i)
      refuse('a vessel cannot discharge into itself', `vessels.${i}.dischargesTo`, fileName);
    if (v.connection === 'submerged') {
      // both surfaces must be on one datum for their difference to be a head
      if (v.baseElevationM === undefined)
        refuse(
          'a submerged connection needs baseElevationM (on the common site datum)',
          `vessels.${i}.baseElevationM`,
          fileName,
        );
      if (vessels[j].baseElevationM === undefined) {
        refuse(
          `receives a submerged outlet from "${v.id}", so it needs baseElevationM`,
          `vessels.${j}.baseElevationM`,
          fileName,
        );
      }
    }
  });
  // each vessel has one outlet, so following dischargesTo from any vessel must end
  vessels.forEach((_, i) => {
    const seen = new Set<number>([i]);
    let k = i;
    while (vessels[k].dischargesTo !== null) {
      k = index.get(vessels[k].dischargesTo!)!;
      if (seen.has(k))
        refuse(
          `the vessels discharge in a loop (${[...seen].map((s) => vessels[s].id).join(' → ')} → ${vessels[k].id})`,
          `vessels.${i}.dischargesTo`,
          fileName,
        );
      seen.add(k);
    }
  });
  const inflows: SystemInflow[] = (r.data.inflows ?? []).map((f, i) => {
    if (!index.has(f.to)) refuse(`no vessel has id "${f.to}"`, `inflows.${i}.to`, fileName);
    if ('log' in f) {
      if (f.unit !== undefined && flowFactorToM3s(f.unit) === null)
        refuse(
          `"${f.unit}" is not a flow unit we know (e.g. L/s, m3/h, gpm)`,
          `inflows.${i}.unit`,
          fileName,
        );
      return f.unit === undefined
        ? { to: f.to, log: f.log }
        : { to: f.to, log: f.log, unit: f.unit };
    }
    let q: number;
    try {
      q = typeof f.constant === 'number' ? f.constant : parseFlow(f.constant);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      refuse(e.message, `inflows.${i}.constant`, fileName);
    }
    if (!(q >= 0))
      refuse(`must not be negative (got ${f.constant})`, `inflows.${i}.constant`, fileName);
    return { to: f.to, constantM3S: q };
  });
  return { name: r.data.name, site: r.data.site, notes: r.data.notes, vessels, inflows };
}

/** Read a system file's text (JSON); syntax errors carry the line. */
export function parseSystemFile(text: string, fileName: string): SystemSpec {
  return validateSystem(parseJsonText(text, fileName), fileName);
}

export function parseJsonText(text: string, fileName: string): unknown {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  try {
    return JSON.parse(body);
  } catch (e) {
    const offset = jsonErrorOffset(body);
    const line = lineOf(body, offset < 0 ? body.length : offset);
    const what =
      body.trim() === ''
        ? 'the file is empty'
        : (e as Error).message.replace(/, ".*" is not valid JSON$/s, '');
    throw new InputError(`not valid JSON: ${what}`, { file: fileName, line });
  }
}
