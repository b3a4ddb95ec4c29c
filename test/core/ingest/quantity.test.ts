import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';
import { waterDensityKgM3 } from '../../../server/core/units/index.js';

const enc = (s: string) => new TextEncoder().encode(s);
const read = (s: string, o = {}) => readLevelLog(enc(s), 'log.csv', o);
const G = 9.80665; // standard gravity, 3rd CGPM (1901)
const one = (header: string, v: string, extra = '') =>
  `Timestamp,${header}${extra ? ',Temp (°C)' : ''}\n2026-05-04T10:00:00Z,${v}${extra ? `,${extra}` : ''}\n2026-05-04T10:00:01Z,${v}${extra ? `,${extra}` : ''}\n`;
const refusal = (f: () => unknown): InputError => {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
};

describe('level in length units', () => {
  // NIST SP 811 (2008), Appendix B.8: foot = 0.3048 m and inch = 0.0254 m exactly.
  it('converts ft, in, cm and mm to metres', () => {
    expect(read(one('Stage (ft)', '10')).levelM[0]).toBeCloseTo(3.048, 12);
    expect(read(one('Level (in)', '10')).levelM[0]).toBeCloseTo(0.254, 12);
    expect(read(one('Level [cm]', '254')).levelM[0]).toBeCloseTo(2.54, 12);
    expect(read(one('level_mm', '2540')).levelM[0]).toBeCloseTo(2.54, 12);
  });
});

describe('pressure to head', () => {
  // NIST SP 811 (2008), Appendix B.8: 1 psi = 6.894 757 E+03 Pa.
  it('turns gauge psi into head p/(ρ·g) with the given density', () => {
    const s = read(one('Pressure (psi)', '1'), { fluidDensityKgM3: 1000 });
    expect(s.levelM[0]).toBeCloseTo(6894.757 / (1000 * G), 6);
  });
  it('uses local gravity when given', () => {
    const s = read(one('P_gauge (kPa)', '9.81'), { fluidDensityKgM3: 1000, gravityMS2: 9.81 });
    expect(s.levelM[0]).toBeCloseTo(1, 12);
  });
  it('takes water density from the temperature column, sample by sample, and notes it', () => {
    const text =
      'Timestamp,Pressure gauge (kPa),Temp (°F)\n2026-05-04T10:00:00Z,10,39.2\n2026-05-04T10:00:01Z,10,86\n';
    const s = read(text);
    // 39.2 °F = 4 °C and 86 °F = 30 °C (NIST SP 811 B.9: t/°C = (t/°F − 32)/1.8).
    expect(s.temperatureC![0]).toBeCloseTo(4, 12);
    expect(s.temperatureC![1]).toBeCloseTo(30, 12);
    expect(s.levelM[0]).toBeCloseTo(10000 / (waterDensityKgM3(4) * G), 12);
    expect(s.levelM[1]).toBeCloseTo(10000 / (waterDensityKgM3(30) * G), 12);
    // Water at 30 °C is about 995.65 kg/m³ and at 4 °C about 999.97 kg/m³ (Tanaka et al.,
    // Metrologia 38 (2001), table; from memory): the warmer column reads about 0.43 % higher.
    expect(s.levelM[1] / s.levelM[0]).toBeCloseTo(999.97 / 995.65, 4);
    expect(s.notes.find((n) => n.code === 'density')!.message).toMatch(/temperature column/);
  });
  it('keeps a given fluid density over the temperature column, and says so', () => {
    const s = read(one('Pressure gauge (kPa)', '12', '30'), { fluidDensityKgM3: 1200 });
    expect(s.levelM[0]).toBeCloseTo(12000 / (1200 * G), 12);
    expect(s.notes.find((n) => n.code === 'density')!.message).toMatch(/as given.*not used/);
  });
  it('refuses a water temperature outside the density formula, naming the line', () => {
    const text =
      'Timestamp,Pressure gauge (kPa),Temp (°C)\n2026-05-04T10:00:00Z,10,20\n2026-05-04T10:00:01Z,10,-5\n';
    const e = refusal(() => read(text));
    expect(e.line).toBe(3);
    expect(e.field).toBe('Temp (°C)');
  });
  it('reads a pressure that names no reference as gauge, or as absolute when a barometric log is given', () => {
    const text = 'Timestamp,Pressure (kPa)\n2026-05-04T10:00:30Z,111\n2026-05-04T10:00:40Z,110\n';
    const gauge = read(text, { fluidDensityKgM3: 1000 });
    expect(gauge.columns[1].role).toBe('gauge-pressure');
    expect(gauge.notes.find((n) => n.code === 'pressure-reference')!.message).toMatch(/--quantity/);
    const baro = 'Stamp,Baro (kPa)\n2026-05-04T10:00:00Z,101\n2026-05-04T10:01:00Z,101\n';
    const abs = read(text, {
      fluidDensityKgM3: 1000,
      baro: { bytes: enc(baro), fileName: 'b.csv' },
    });
    expect(abs.columns[1].role).toBe('absolute-pressure');
    expect(abs.levelM[0]).toBeCloseTo(10000 / (1000 * G), 9);
  });
  it('subtracts a barometric log interpolated in time from absolute pressure', () => {
    const abs =
      'Timestamp;P_abs (kPa)\n2026-05-04T10:00:30Z;111,0\n2026-05-04T10:01:00Z;110,9\n2026-05-04T10:01:30Z;110,8\n';
    const baro =
      'Stamp,Baro (hPa)\n2026-05-04T10:00:00Z,1000\n2026-05-04T10:01:00Z,1010\n2026-05-04T10:02:00Z,1020\n';
    const s = readLevelLog(enc(abs), 'abs.csv', {
      baro: { bytes: enc(baro), fileName: 'baro.csv' },
      fluidDensityKgM3: 1000,
    });
    expect(s.levelM[0]).toBeCloseTo((111000 - 100500) / (1000 * G), 9);
    expect(s.levelM[1]).toBeCloseTo((110900 - 101000) / (1000 * G), 9);
    expect(s.levelM[2]).toBeCloseTo((110800 - 101500) / (1000 * G), 9);
    expect(s.notes.find((n) => n.code === 'baro')!.message).toMatch(/baro\.csv/);
  });
  it('refuses a barometric log that does not cover the test, naming both spans', () => {
    const abs = 'Timestamp,P_abs (kPa)\n2026-05-04T10:00:30Z,111\n2026-05-04T10:05:00Z,110\n';
    const baro = 'Stamp,Baro (hPa)\n2026-05-04T10:00:00Z,1000\n2026-05-04T10:01:00Z,1010\n';
    const e = refusal(() =>
      readLevelLog(enc(abs), 'abs.csv', { baro: { bytes: enc(baro), fileName: 'baro.csv' } }),
    );
    expect(e.message).toMatch(
      /10:00:00.000Z to 2026-05-04T10:01:00.000Z.*10:00:30.000Z to 2026-05-04T10:05:00.000Z/,
    );
    expect(e.file).toBe('baro.csv');
  });
  it('refuses absolute pressure without a barometric log', () => {
    expect(refusal(() => read(one('P_abs (kPa)', '101'))).message).toMatch(/--baro/);
  });
  it('refuses absolute pressure against elapsed time', () => {
    const baro = 'Stamp,Baro (hPa)\n2026-05-04T10:00:00Z,1000\n2026-05-04T10:01:00Z,1010\n';
    const e = refusal(() =>
      read('Elapsed (s),P_abs (kPa)\n0,110\n1,110\n', {
        baro: { bytes: enc(baro), fileName: 'b.csv' },
      }),
    );
    expect(e.message).toMatch(/dates and times/);
  });
});

describe('distance from a top-mounted sensor', () => {
  it('gives level = mount elevation − distance − zero elevation', () => {
    const s = read(one('Distance to surface (m)', '0.75'), {
      mountElevationM: 4,
      zeroElevationM: 0.5,
    });
    expect(s.levelM[0]).toBeCloseTo(2.75, 12);
  });
  it('refuses without the mount elevation', () => {
    const e = refusal(() => read(one('Distance to surface (m)', '0.75')));
    expect(e.message).toMatch(/mount elevation/);
    expect(e.field).toBe('mountElevationM');
  });
});
