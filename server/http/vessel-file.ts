import { InputError } from '../core/errors.js';

/**
 * Checks a vessel file before it is stored.
 * PROVISIONAL: the vessel-file schema (server/core/vessel/schema.ts, validateVessel) is being
 * written elsewhere; until it lands this only checks the outline (a name, a shape with a kind,
 * outlets as objects) and the analysis validates the rest.
 */
export function checkVesselFile(value: unknown, fileName?: string): Record<string, unknown> {
  const where = (field: string) => ({ file: fileName, field });
  if (typeof value !== 'object' || value === null || Array.isArray(value)) throw new InputError('a vessel file is a JSON object', where(''));
  const v = value as Record<string, unknown>;
  if (typeof v.name !== 'string' || v.name.trim() === '') throw new InputError('a vessel needs a name', where('name'));
  const shape = v.shape as Record<string, unknown> | undefined;
  if (typeof shape !== 'object' || shape === null || typeof shape.kind !== 'string') {
    throw new InputError('a vessel needs a shape with a kind', where('shape.kind'));
  }
  if (v.outlets !== undefined && (!Array.isArray(v.outlets) || v.outlets.some((o) => typeof o !== 'object' || o === null))) {
    throw new InputError('outlets is a list of objects', where('outlets'));
  }
  if (v.outlet !== undefined && (typeof v.outlet !== 'object' || v.outlet === null)) throw new InputError('outlet is an object', where('outlet'));
  return v;
}
