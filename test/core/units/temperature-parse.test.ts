import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../../server/core/errors.js';
import {
  parseFlow,
  parseLength,
  temperatureToC,
  temperatureUnit,
} from '../../../server/core/units/index.js';

describe('temperatureUnit', () => {
  it('reads the usual spellings', () => {
    for (const u of ['C', '°C', 'degC', 'deg C', 'c', '℃', 'ºC', 'Celsius'])
      expect(temperatureUnit(u)).toBe('C');
    for (const u of ['F', '°F', 'degF', 'f', 'Fahrenheit']) expect(temperatureUnit(u)).toBe('F');
    for (const u of ['K', 'kelvin', '°K']) expect(temperatureUnit(u)).toBe('K');
  });
  it('returns null for anything else', () => {
    for (const u of ['', 'deg', 'R', 'm', 'kPa']) expect(temperatureUnit(u)).toBeNull();
  });
});

describe('temperatureToC', () => {
  it('follows NIST SP 811 (2008): t/°C = (t/°F − 32)/1.8, t/°C = T/K − 273.15', () => {
    // SP 811 B.9 and 4.2.1.1. Fixed points: water freezes at 32 °F = 0 °C, boils at 212 °F = 100 °C
    // (common practice); 0 °C = 273.15 K by definition.
    expect(temperatureToC(32, '°F')).toBe(0);
    expect(temperatureToC(212, 'degF')).toBe(100);
    expect(temperatureToC(-40, 'F')).toBe(-40);
    expect(temperatureToC(273.15, 'K')).toBe(0);
    expect(temperatureToC(21.5, 'degC')).toBe(21.5);
  });
  it('round-trips through °F and K', () => {
    fc.assert(
      fc.property(fc.double({ min: -200, max: 1000, noNaN: true }), (c) => {
        const f = c * 1.8 + 32;
        const k = c + 273.15;
        return (
          Math.abs(temperatureToC(f, 'F') - c) < 1e-9 && Math.abs(temperatureToC(k, 'K') - c) < 1e-9
        );
      }),
    );
  });
  it('is increasing in the reading for every scale', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 500, noNaN: true }),
        fc.double({ min: 0, max: 500, noNaN: true }),
        fc.constantFrom('C', 'F', 'K'),
        (a, b, u) => {
          fc.pre(b - a > 1e-9); // closer than that, °C values can round to the same double
          return temperatureToC(a, u) < temperatureToC(b, u);
        },
      ),
    );
  });
  it('refuses unknown units, non-numbers and temperatures below absolute zero', () => {
    expect(() => temperatureToC(20, 'R')).toThrow(InputError);
    expect(() => temperatureToC(Number.NaN, 'C')).toThrow(InputError);
    expect(() => temperatureToC(-1, 'K')).toThrow(/absolute zero/);
    expect(() => temperatureToC(-500, 'F')).toThrow(InputError);
  });
});

describe('parseFlow', () => {
  it('reads a value with its unit', () => {
    expect(parseFlow('2.5L/s')).toBeCloseTo(0.0025, 15);
    expect(parseFlow('9 m3/h')).toBeCloseTo(0.0025, 15);
    // NIST SP 811 (2008) B.8: 1 gpm = 6.309 020 E-05 m³/s.
    expect(Number((parseFlow('40 gpm') / 40).toPrecision(7))).toBe(6.30902e-5);
    expect(parseFlow(' 1,5 L/min ')).toBeCloseTo(1.5e-3 / 60, 15);
    expect(parseFlow('1e-3 m³/s')).toBe(1e-3);
  });
  it('refuses unreadable text and names it', () => {
    for (const t of ['', 'fast', '2.5', '2.5 furlongs', 'L/s 2', '1.2.3 L/s']) {
      expect(() => parseFlow(t)).toThrow(InputError);
    }
    expect(() => parseFlow('2.5 furlongs')).toThrow(/"2\.5 furlongs"/);
    expect(() => parseFlow('12')).toThrow(/no unit/);
  });
});

describe('parseLength', () => {
  it('reads a value with its unit', () => {
    expect(parseLength('35mm')).toBeCloseTo(0.035, 15);
    // NIST SP 811 (2008) B.8: 1 in = 0.0254 m, 1 ft = 0.3048 m, exact.
    expect(parseLength('6 in')).toBeCloseTo(0.1524, 15);
    expect(parseLength("4'")).toBeCloseTo(1.2192, 15);
    expect(parseLength('1.2 m')).toBe(1.2);
  });
  it('refuses unreadable text', () => {
    for (const t of ['', 'tall', '3', '3 kPa']) expect(() => parseLength(t)).toThrow(InputError);
  });
});
