import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import {
  fluidDensityKgM3,
  parseVesselFile,
  validateVessel,
  vesselSchema,
} from '../../../server/core/vessel/schema.js';
import { waterDensityKgM3 } from '../../../server/core/units/index.js';

const good = {
  name: 'Day tank 2',
  site: 'North works',
  shape: { kind: 'vertical-cylinder', diameterM: 3, heightM: 4 },
  outlet: {
    boreM: 0.05,
    boreToleranceM: 0.0005,
    elevationM: 0.1,
    type: 'sharp-edged',
    id: 'DT2-drain',
  },
  sensor: { zeroElevationM: 0.02, mountElevationM: 4.2 },
  fluid: { temperatureC: 12 },
  gravityMS2: 9.806,
  notes: 'invented for the tests',
};

function refusal(value: unknown): InputError {
  try {
    validateVessel(value, 'tank.json');
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected a refusal');
}

const withPatch = (patch: (v: any) => void) => {
  const v = structuredClone(good) as any;
  patch(v);
  return v;
};

describe('validateVessel accepts', () => {
  it('a complete file and a minimal one', () => {
    expect(validateVessel(good).outlet.type).toBe('sharp-edged');
    const min = {
      name: 'x',
      shape: { kind: 'sphere', diameterM: 2 },
      outlet: { boreM: 0.02, elevationM: 0 },
    };
    expect(validateVessel(min)).toEqual(min);
  });
  it('the demo vessel files in sample-data', () => {
    // the 11 invented vessels of the demo scenario (sample-data/README.md); kept in the repository
    const folder = new URL('../../../sample-data/', import.meta.url);
    const names = readdirSync(folder).filter((f) => f.endsWith('.vessel.json'));
    expect(names.length).toBe(11);
    for (const name of names) {
      expect(parseVesselFile(readFileSync(new URL(name, folder), 'utf8'), name).name).toMatch(/\S/);
    }
  });
  it('every shape kind', () => {
    for (const shape of [
      { kind: 'rectangular', lengthM: 2, widthM: 1 },
      { kind: 'horizontal-cylinder', diameterM: 2, lengthM: 5 },
      { kind: 'cone-bottom', diameterM: 2, coneHeightM: 1, heightM: 3 },
      {
        kind: 'table',
        points: [
          [0, 4],
          [1, 6],
        ],
      },
      { kind: 'elliptical-head-cylinder', diameterM: 2 },
    ]) {
      expect(validateVessel({ ...good, shape, sensor: undefined }).shape).toEqual(shape);
    }
  });
});

describe('validateVessel refuses, naming the field', () => {
  it.each<[string, (v: any) => void, string, RegExp]>([
    [
      'negative diameter',
      (v) => (v.shape.diameterM = -2),
      'shape.diameterM',
      /^must be a positive number \(got -2\)$/,
    ],
    [
      'diameter as text',
      (v) => (v.shape.diameterM = '3'),
      'shape.diameterM',
      /must be a number \(got "3"\)/,
    ],
    ['missing diameter', (v) => delete v.shape.diameterM, 'shape.diameterM', /is required/],
    [
      'unknown shape kind',
      (v) => (v.shape = { kind: 'pyramid' }),
      'shape.kind',
      /must be one of .*"sphere".*\(got "pyramid"\)/,
    ],
    ['unknown field in shape', (v) => (v.shape.radius = 1), 'shape.radius', /not a known field/],
    ['unknown top-level field', (v) => (v.colour = 'red'), 'colour', /not a known field/],
    ['empty name', (v) => (v.name = ''), 'name', /must not be empty/],
    ['missing name', (v) => delete v.name, 'name', /is required/],
    ['missing outlet', (v) => delete v.outlet, 'outlet', /is required/],
    ['zero bore', (v) => (v.outlet.boreM = 0), 'outlet.boreM', /positive/],
    [
      'negative bore tolerance',
      (v) => (v.outlet.boreToleranceM = -1e-4),
      'outlet.boreToleranceM',
      /≥ 0/,
    ],
    [
      'negative outlet elevation',
      (v) => (v.outlet.elevationM = -0.1),
      'outlet.elevationM',
      /≥ 0 \(got -0.1\)/,
    ],
    [
      'unknown outlet type',
      (v) => (v.outlet.type = 'orifice'),
      'outlet.type',
      /"sharp-edged".*\(got "orifice"\)/,
    ],
    ['unknown field in outlet', (v) => (v.outlet.cd = 0.6), 'outlet.cd', /not a known field/],
    [
      'sensor mount not positive',
      (v) => (v.sensor.mountElevationM = 0),
      'sensor.mountElevationM',
      /positive/,
    ],
    [
      'fluid with both forms',
      (v) => (v.fluid = { densityKgM3: 1000, temperatureC: 20 }),
      'fluid',
      /exactly one of/,
    ],
    ['empty fluid', (v) => (v.fluid = {}), 'fluid', /exactly one of/],
    ['negative density', (v) => (v.fluid = { densityKgM3: -1 }), 'fluid.densityKgM3', /positive/],
    [
      'temperature beyond water',
      (v) => (v.fluid = { temperatureC: 120 }),
      'fluid.temperatureC',
      /≤ 100/,
    ],
    [
      'table of one point',
      (v) => (v.shape = { kind: 'table', points: [[0, 1]] }),
      'shape.points',
      /at least 2/,
    ],
    [
      'table with falling heights',
      (v) =>
        (v.shape = {
          kind: 'table',
          points: [
            [0, 1],
            [2, 2],
            [1, 3],
          ],
        }),
      'shape.points.2.0',
      /increase/,
    ],
    [
      'table with zero area',
      (v) =>
        (v.shape = {
          kind: 'table',
          points: [
            [0, 1],
            [1, 0],
          ],
        }),
      'shape.points.1.1',
      /positive/,
    ],
    [
      'cone taller than the vessel',
      (v) => (v.shape = { kind: 'cone-bottom', diameterM: 2, coneHeightM: 3, heightM: 2 }),
      'shape.heightM',
      /at least the cone height/,
    ],
    [
      'outlet above the top',
      (v) => (v.outlet.elevationM = 4),
      'outlet.elevationM',
      /below the top of the vessel \(4 m\)/,
    ],
    [
      'bore wider than the vessel',
      (v) => (v.outlet.boreM = 3),
      'outlet.boreM',
      /smaller than the vessel/,
    ],
    [
      'bore wider than a table vessel',
      (v) =>
        (v.shape = {
          kind: 'table',
          points: [
            [0, 0.001],
            [1, 0.001],
          ],
        }),
      'outlet.boreM',
      /smaller than the vessel/,
    ],
    [
      'tolerance as large as the bore',
      (v) => (v.outlet.boreToleranceM = 0.05),
      'outlet.boreToleranceM',
      /smaller than the bore/,
    ],
    [
      'gauge below the outlet',
      (v) => (v.sensor.mountElevationM = 0.05),
      'sensor.mountElevationM',
      /above the outlet/,
    ],
    ['gravity in ft/s²', (v) => (v.gravityMS2 = 32.17), 'gravityMS2', /between 9.7 and 9.9/],
  ])('%s', (_what, patch, field, message) => {
    const e = refusal(withPatch(patch));
    expect(e.field).toBe(field);
    expect(e.message).toMatch(message);
    expect(e.file).toBe('tank.json');
  });
  it('refuses a document that is not an object', () => {
    for (const v of [null, 3, 'tank', []]) expect(refusal(v).message).toMatch(/must be an object/);
  });
  it('reports one error for a document with several', () => {
    const e = refusal(withPatch((v) => ((v.shape.diameterM = -1), (v.outlet.boreM = -1))));
    expect(e.field).toBe('shape.diameterM');
    expect(e.toLine()).toBe('tank.json, field shape.diameterM: must be a positive number (got -1)');
  });
});

describe('vesselSchema', () => {
  it('is the same check the service can reuse', () => {
    expect(vesselSchema.safeParse(good).success).toBe(true);
    expect(vesselSchema.safeParse(withPatch((v) => (v.outlet.boreM = 9))).success).toBe(false);
  });
});

describe('parseVesselFile', () => {
  it('gives the line of a JSON syntax error', () => {
    const text =
      '{\n  "name": "a",\n  "shape": {"kind": "sphere", "diameterM": 2},\n  "outlet": {"boreM": 0.02 "elevationM": 0}\n}\n';
    try {
      parseVesselFile(text, 'bad.json');
      throw new Error('expected a refusal');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).line).toBe(4);
      expect((e as InputError).file).toBe('bad.json');
      expect((e as InputError).message).toMatch(/^not valid JSON/);
    }
  });
  it.each([
    ['trailing comma', '{\n"name": "a",\n}', 3],
    ['bad literal', '{\n"a":\n tru\n}', 3],
    ['unterminated', '{\n"a": [1,\n2', 3],
    ['empty file', '', 1],
    ['trailing text', '{}\n\nx', 3],
  ])('%s → line %d', (_what, text, line) => {
    try {
      parseVesselFile(text, 'v.json');
      throw new Error('expected a refusal');
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).line).toBe(line);
    }
  });
  it('accepts a byte-order mark and passes schema errors on with the file name', () => {
    expect(parseVesselFile('\ufeff' + JSON.stringify(good), 'v.json').name).toBe('Day tank 2');
    expect(() => parseVesselFile('{"name": "a"}', 'v.json')).toThrow(/is required/);
  });
});

describe('fluidDensityKgM3', () => {
  const base = validateVessel({ ...good, fluid: undefined });
  it('uses a given density first', () => {
    const r = fluidDensityKgM3({ ...base, fluid: { densityKgM3: 1030 } }, 25);
    expect(r.value).toBe(1030);
    expect(r.source).toMatch(/given/);
  });
  it('then the measured temperature, then the file temperature', () => {
    expect(fluidDensityKgM3({ ...base, fluid: { temperatureC: 12 } }, 25).value).toBe(
      waterDensityKgM3(25),
    );
    const r = fluidDensityKgM3({ ...base, fluid: { temperatureC: 12 } });
    expect(r.value).toBe(waterDensityKgM3(12));
    expect(r.source).toMatch(/12 °C, from the vessel file/);
  });
  it('else assumes water at 20 °C and says so', () => {
    const r = fluidDensityKgM3(base);
    // Tanaka et al. 2001 table: 998.2067 kg/m³ at 20 °C (from memory).
    expect(r.value).toBeCloseTo(998.2067, 3);
    expect(r.source).toMatch(/20 °C, assumed/);
  });
  it('refuses a measured temperature outside the formula', () => {
    expect(() => fluidDensityKgM3(base, 130)).toThrow(InputError);
  });
});
