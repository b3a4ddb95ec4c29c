import { InputError } from '../core/errors.js';
import { validateVessel } from '../core/vessel/schema.js';

/**
 * Checks a vessel body before it is stored: the vessel-file format (server/core/vessel/schema.ts),
 * with two additions the service keeps beside it:
 * - `outlets: [...]` instead of `outlet`, for a vessel with several outlets (each with an `id`);
 *   every outlet is validated as the single-outlet vessel file the analysis will receive;
 * - `actionThreshold` on an outlet: the fraction of the baseline effective area below which the
 *   trend calls for action (0 < x ≤ 1). It is stripped before the analysis sees the file.
 */
export function checkVesselFile(value: unknown, fileName?: string): Record<string, unknown> {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    throw new InputError('a vessel file is a JSON object', { file: fileName });
  }
  const { outlets, ...rest } = value as Record<string, unknown>;
  let list: unknown[];
  let prefix: (i: number) => string;
  if (outlets === undefined) {
    list = [rest.outlet];
    prefix = () => 'outlet';
  } else {
    if (rest.outlet !== undefined)
      throw new InputError('give either outlet or outlets, not both', {
        file: fileName,
        field: 'outlets',
      });
    if (!Array.isArray(outlets) || outlets.length === 0)
      throw new InputError('outlets is a non-empty list', { file: fileName, field: 'outlets' });
    list = outlets;
    prefix = (i) => `outlets[${i}]`;
  }
  const ids = new Set<string>();
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
    ) {
      throw new InputError(
        'actionThreshold is the baseline effective area times a factor: below 1 for fouling (e.g. 0.9), above 1 for erosion (e.g. 1.1); 0 < x < 2, not 1',
        { file: fileName, field: `${prefix(i)}.actionThreshold` },
      );
    }
    try {
      validateVessel({ ...rest, outlet: o === undefined ? undefined : plain }, fileName);
    } catch (e) {
      if (e instanceof InputError && e.field?.startsWith('outlet')) {
        throw new InputError(e.message, {
          file: e.file,
          line: e.line,
          field: e.field.replace(/^outlet/, prefix(i)),
        });
      }
      throw e;
    }
    if (list.length > 1) {
      const id = plain.id;
      if (typeof id !== 'string')
        throw new InputError('each of several outlets needs an id', {
          file: fileName,
          field: `${prefix(i)}.id`,
        });
      if (ids.has(id))
        throw new InputError(`outlet id "${id}" is used twice`, {
          file: fileName,
          field: `${prefix(i)}.id`,
        });
      ids.add(id);
    }
  });
  return value as Record<string, unknown>;
}
