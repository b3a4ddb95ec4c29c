import { InputError } from '../errors.js';
import { describeIssue } from './issues.js';
import { vesselSchema } from './schema.js';

/**
 * The vessel file as the service keeps it: the vessel-file format (schema.ts) with two additions
 * beside it, checked here for the API, the CLI, the demo loader and the workbench's vessel form
 * alike (the web bundles this module, so a field typed there gets the same rule and message):
 * - `outlets: [...]` instead of `outlet`, for a vessel with several outlets (each with an `id`);
 *   every outlet is validated as the single-outlet vessel file the analysis will receive;
 * - `actionThreshold` on an outlet: the baseline effective area times this factor is the action
 *   threshold (below 1 fouling, above 1 erosion; 0 < x < 2, not 1). Stripped before analysis.
 */

export interface VesselFileProblem {
  /** Dotted path into the file ("outlets.1.boreM"; "outlets[1]" for the several-outlet list). */
  field: string;
  message: string;
}

const THRESHOLD_RULE =
  'actionThreshold is the baseline effective area times a factor: below 1 for fouling (e.g. 0.9), above 1 for erosion (e.g. 1.1); 0 < x < 2, not 1';

/** Every problem of a vessel body, each with its field (empty when the body can be stored). */
export function vesselFileProblems(value: unknown): VesselFileProblem[] {
  if (typeof value !== 'object' || value === null || Array.isArray(value))
    return [{ field: '', message: 'a vessel file is a JSON object' }];
  const { outlets, ...rest } = value as Record<string, unknown>;
  let list: unknown[];
  let prefix: (i: number) => string;
  if (outlets === undefined) {
    list = [rest.outlet];
    prefix = () => 'outlet';
  } else {
    if (rest.outlet !== undefined)
      return [{ field: 'outlets', message: 'give either outlet or outlets, not both' }];
    if (!Array.isArray(outlets) || outlets.length === 0)
      return [{ field: 'outlets', message: 'outlets is a non-empty list' }];
    list = outlets;
    prefix = (i) => `outlets[${i}]`;
  }
  const out: VesselFileProblem[] = [];
  const seen = new Set<string>();
  const ids = new Set<string>();
  const add = (p: VesselFileProblem) => {
    const k = `${p.field}\n${p.message}`;
    if (!seen.has(k)) {
      seen.add(k);
      out.push(p);
    }
  };
  list.forEach((o, i) => {
    const { actionThreshold, ...plain } = (o ?? {}) as Record<string, unknown>;
    if (
      actionThreshold !== undefined &&
      !(
        typeof actionThreshold === 'number' &&
        actionThreshold > 0 &&
        actionThreshold < 2 &&
        actionThreshold !== 1
      )
    )
      add({ field: `${prefix(i)}.actionThreshold`, message: THRESHOLD_RULE });
    const one = { ...rest, outlet: o === undefined ? undefined : plain };
    const r = vesselSchema.safeParse(one);
    if (!r.success) {
      for (const issue of r.error.issues) {
        const { field, message } = describeIssue(issue, one);
        // the outlet's own problems belong to its place in the list; the rest are shared
        add({ field: field.replace(/^outlet(?=\.|$)/, prefix(i)), message });
      }
    }
    if (list.length > 1) {
      const id = plain.id;
      if (typeof id !== 'string')
        add({ field: `${prefix(i)}.id`, message: 'each of several outlets needs an id' });
      else if (ids.has(id))
        add({ field: `${prefix(i)}.id`, message: `outlet id "${id}" is used twice` });
      else ids.add(id);
    }
  });
  return out;
}

/** Checks a vessel body before it is stored; the first problem becomes one InputError naming its field. */
export function checkVesselFile(value: unknown, fileName?: string): Record<string, unknown> {
  const [first] = vesselFileProblems(value);
  if (first)
    throw new InputError(first.message, {
      file: fileName,
      field: first.field === '' ? undefined : first.field,
    });
  return value as Record<string, unknown>;
}
