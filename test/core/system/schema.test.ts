import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { parseSystemFile, validateSystem } from '../../../server/core/system/schema.js';

const vessel = (id: string, to: string | null, extra: Record<string, unknown> = {}) => ({
  id,
  name: `Vessel ${id}`,
  shape: { kind: 'vertical-cylinder', diameterM: 1, heightM: 2 },
  outlet: { boreM: 0.04, elevationM: 0.1 },
  sensor: { zeroElevationM: 0 },
  dischargesTo: to,
  connection: 'free',
  ...extra,
});

function refusal(value: unknown): InputError {
  try {
    validateSystem(value, 'plant.json');
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('not refused');
}

describe('system file', () => {
  it('reads a chain and converts a constant inflow with its unit', () => {
    const s = validateSystem({
      name: 'x',
      vessels: [vessel('A', 'B'), vessel('B', null)],
      inflows: [{ to: 'A', constant: '2.5L/s' }],
    });
    expect(s.inflows[0]).toEqual({ to: 'A', constantM3S: 0.0025 });
  });

  it.each([
    [
      'a repeated id',
      { name: 'x', vessels: [vessel('A', null), vessel('A', null)] },
      'vessels.1.id',
      /used twice/,
    ],
    [
      'an unknown receiver',
      { name: 'x', vessels: [vessel('A', 'Z')] },
      'vessels.0.dischargesTo',
      /no vessel has id "Z"/,
    ],
    [
      'a loop',
      { name: 'x', vessels: [vessel('A', 'B'), vessel('B', 'A')] },
      'vessels.0.dischargesTo',
      /loop/,
    ],
    [
      'a bad vessel field',
      { name: 'x', vessels: [vessel('A', null, { outlet: { boreM: -1, elevationM: 0.1 } })] },
      'vessels.0.outlet.boreM',
      /positive/,
    ],
    [
      'a bad connection',
      { name: 'x', vessels: [vessel('A', null, { connection: 'pipe' })] },
      'vessels.0.connection',
      /one of/,
    ],
    [
      'a submerged link without datum',
      { name: 'x', vessels: [vessel('A', 'B', { connection: 'submerged' }), vessel('B', null)] },
      'vessels.0.baseElevationM',
      /baseElevationM/,
    ],
    [
      'an inflow to nowhere',
      { name: 'x', vessels: [vessel('A', null)], inflows: [{ to: 'Q', constant: 1 }] },
      'inflows.0.to',
      /no vessel/,
    ],
    [
      'an inflow without unit',
      { name: 'x', vessels: [vessel('A', null)], inflows: [{ to: 'A', constant: '2.5' }] },
      'inflows.0.constant',
      /no unit/,
    ],
  ])('refuses %s, naming the field', (_what, doc, field, message) => {
    const e = refusal(doc);
    expect(e.field).toBe(field);
    expect(e.message).toMatch(message);
    expect(e.file).toBe('plant.json');
  });

  it('gives the line of a JSON syntax error', () => {
    expect(() => parseSystemFile('{\n "name": "x",\n }', 'plant.json')).toThrow(InputError);
  });
});
