import { describe, expect, it } from 'vitest';
import { prepareDrainTest } from '../../../server/core/analyze.js';
import { STANDARD_GRAVITY_MS2, waterDensityKgM3 } from '../../../server/core/units/index.js';

/** Pressure → head uses the vessel file's fluid when the log has no temperature column. */
const vessel = (fluid: object) => ({
  name: 't',
  shape: { kind: 'vertical-cylinder', diameterM: 2 },
  outlet: { boreM: 0.05, elevationM: 0 },
  sensor: { zeroElevationM: 0 },
  fluid,
});
const log = (withTemp: boolean) => {
  const rows = [withTemp ? 'elapsed (s),P (kPa),Temp (°C)' : 'elapsed (s),P (kPa)'];
  for (let i = 0; i < 400; i++)
    rows.push(`${i},${(30 * (1 - i / 800) ** 2).toFixed(4)}${withTemp ? ',10' : ''}`);
  return { bytes: new TextEncoder().encode(rows.join('\n') + '\n'), fileName: 'p.csv' };
};
const firstLevel = (fluid: object, withTemp: boolean) =>
  prepareDrainTest({
    log: log(withTemp),
    vessel: vessel(fluid),
    settings: { quantity: 'gauge-pressure' },
  }).series.levelM[0];

describe('fluid density for pressure logs', () => {
  it('a fluid temperature in the vessel file is used when the log has no temperature column', () => {
    expect(firstLevel({ temperatureC: 40 }, false)).toBeCloseTo(
      30_000 / (waterDensityKgM3(40) * STANDARD_GRAVITY_MS2),
      10,
    );
  });
  it("the log's own temperature column wins over the vessel file's temperature", () => {
    expect(firstLevel({ temperatureC: 40 }, true)).toBeCloseTo(
      30_000 / (waterDensityKgM3(10) * STANDARD_GRAVITY_MS2),
      10,
    );
  });
  it('a stated density wins over both', () => {
    expect(firstLevel({ densityKgM3: 1100 }, true)).toBeCloseTo(
      30_000 / (1100 * STANDARD_GRAVITY_MS2),
      10,
    );
  });
});
