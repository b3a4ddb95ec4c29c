import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  flowFactorToM3s,
  lengthFactorToM,
  pressureFactorToPa,
  STANDARD_GRAVITY_MS2,
} from '../../../server/core/units/index.js';

/**
 * NIST SP 811 (2008), Appendix B.8, prints factors rounded to 7 significant digits (bold ones
 * exact). A factor agrees with the table when it rounds to the printed value.
 */
function agreesWithTable(actual: number | null, printed: number, digits = 7): void {
  expect(actual).not.toBeNull();
  expect(Number((actual as number).toPrecision(digits))).toBe(printed);
}

describe('standard gravity', () => {
  it('is the 1901 CGPM value', () => {
    // NIST SP 811 (2008), B.8 "standard acceleration of gravity (gn)": 9.806 65 m/s² exact.
    expect(STANDARD_GRAVITY_MS2).toBe(9.80665);
  });
});

describe('lengthFactorToM', () => {
  it('matches NIST SP 811 (2008) Appendix B.8', () => {
    // B.8 "inch (in)": 2.54 E-02 m, exact.
    for (const u of ['in', 'inch', 'inches', 'IN', '"']) expect(lengthFactorToM(u)).toBe(0.0254);
    // B.8 "foot (ft)": 3.048 E-01 m, exact.
    for (const u of ['ft', 'foot', 'feet', 'FT', "'"]) expect(lengthFactorToM(u)).toBe(0.3048);
  });
  it('applies the SI prefixes', () => {
    // NIST SP 811 (2008) Table 5, SI prefixes: centi = 1e-2, milli = 1e-3.
    for (const u of ['m', 'M', 'metre', 'meters', 'Metres']) expect(lengthFactorToM(u)).toBe(1);
    for (const u of ['cm', 'centimetre', 'CM', '(cm)']) expect(lengthFactorToM(u)).toBe(0.01);
    for (const u of ['mm', 'millimeters', 'MM', ' [mm] ']) expect(lengthFactorToM(u)).toBe(0.001);
  });
  it('refuses what is not a length', () => {
    for (const u of ['', 'kPa', 'yd', 'mmm', 'l', 'km/h']) expect(lengthFactorToM(u)).toBeNull();
  });
});

describe('pressureFactorToPa', () => {
  it('matches NIST SP 811 (2008) Appendix B.8 (7-digit entries as recalled: from memory)', () => {
    // B.8 "pound-force per square inch (psi)": 6.894 757 E+03 Pa.
    agreesWithTable(pressureFactorToPa('psi'), 6894.757);
    agreesWithTable(pressureFactorToPa('PSIG'), 6894.757);
    // B.8 "bar": 1.0 E+05 Pa exact; "millibar (mbar)": 1.0 E+02 Pa exact.
    expect(pressureFactorToPa('bar')).toBe(1e5);
    expect(pressureFactorToPa('mbar')).toBe(100);
    // B.8 "inch of water, conventional (inH2O)": 2.490 889 E+02 Pa.
    for (const u of ['inH2O', 'in H2O', 'inWC', 'INH2O', 'in H₂O', '"H2O'])
      agreesWithTable(pressureFactorToPa(u), 249.0889);
    // B.8 "centimeter of water, conventional (cmH2O)": 9.806 65 E+01 Pa.
    agreesWithTable(pressureFactorToPa('cmH2O'), 98.0665);
    agreesWithTable(pressureFactorToPa('cm H2O'), 98.0665);
    // B.8 "millimeter of water, conventional (mmH2O)": 9.806 65 E+00 Pa.
    agreesWithTable(pressureFactorToPa('mmH2O'), 9.80665);
    // B.8 "millimeter of mercury, conventional (mmHg)": 1.333 224 E+02 Pa.
    agreesWithTable(pressureFactorToPa('mmHg'), 133.3224);
    agreesWithTable(pressureFactorToPa('mm Hg'), 133.3224);
    // B.8 "inch of mercury, conventional (inHg)": 3.386 389 E+03 Pa.
    agreesWithTable(pressureFactorToPa('inHg'), 3386.389);
  });
  it('takes a metre of water as 100 conventional centimetres of water', () => {
    // NIST SP 811 (2008) B.8 lists the centimetre of water, conventional (9.806 65 E+01 Pa);
    // the metre of water is that times 100 by the SI prefix.
    for (const u of ['mH2O', 'm H2O', 'mWC']) agreesWithTable(pressureFactorToPa(u), 9806.65);
  });
  it('applies the SI prefixes to the pascal, keeping case where it matters', () => {
    // NIST SP 811 (2008) Table 5: kilo = 1e3, hecto = 1e2, mega = 1e6.
    expect(pressureFactorToPa('Pa')).toBe(1);
    expect(pressureFactorToPa('kPa')).toBe(1000);
    expect(pressureFactorToPa('KPA')).toBe(1000);
    expect(pressureFactorToPa('hPa')).toBe(100);
    expect(pressureFactorToPa('MPa')).toBe(1e6);
    // millipascal is not a unit a level logger uses; guessing mega would be a 10⁹ error.
    expect(pressureFactorToPa('mPa')).toBeNull();
  });
  it('refuses what is not a pressure', () => {
    for (const u of ['', 'm', 'atmos', 'ftH2O2', 'L/s']) expect(pressureFactorToPa(u)).toBeNull();
  });
});

describe('flowFactorToM3s', () => {
  it('matches NIST SP 811 (2008) Appendix B.8', () => {
    // B.8 "gallon (U.S.) per minute (gpm)": 6.309 020 E-05 m³/s.
    for (const u of ['gpm', 'USgpm', 'gal/min', 'US gal/min', 'GPM'])
      agreesWithTable(flowFactorToM3s(u), 6.30902e-5);
    // B.8 "liter (L)": 1.0 E-03 m³ exact; SP 811 Table 6: 1 min = 60 s, 1 h = 3600 s.
    for (const u of ['L/s', 'l/s', 'lps']) expect(flowFactorToM3s(u)).toBe(1e-3);
    for (const u of ['L/min', 'lpm']) expect(flowFactorToM3s(u)).toBeCloseTo(1e-3 / 60, 18);
    for (const u of ['m³/h', 'm3/h', 'm^3/hr', 'M3/H'])
      expect(flowFactorToM3s(u)).toBeCloseTo(1 / 3600, 17);
    for (const u of ['m³/s', 'm3/s']) expect(flowFactorToM3s(u)).toBe(1);
  });
  it('refuses what is not a flow (and does not guess the imperial gallon)', () => {
    for (const u of ['', 'm3', 'L', 'impgpm', 'kg/s']) expect(flowFactorToM3s(u)).toBeNull();
  });
});

describe('round trips', () => {
  const lengthUnits = ['m', 'cm', 'mm', 'in', 'ft'];
  const pressureUnits = [
    'Pa',
    'kPa',
    'hPa',
    'bar',
    'mbar',
    'psi',
    'inH2O',
    'cmH2O',
    'mH2O',
    'mmHg',
  ];
  const flowUnits = ['m3/s', 'L/s', 'L/min', 'm3/h', 'gpm'];
  const value = fc.double({ min: -1e6, max: 1e6, noNaN: true });

  it('converting a to b and back returns the value', () => {
    for (const [units, f] of [
      [lengthUnits, lengthFactorToM],
      [pressureUnits, pressureFactorToPa],
      [flowUnits, flowFactorToM3s],
    ] as const) {
      fc.assert(
        fc.property(value, fc.constantFrom(...units), fc.constantFrom(...units), (x, a, b) => {
          const toB = (x * f(a)!) / f(b)!;
          const back = (toB * f(b)!) / f(a)!;
          return Math.abs(back - x) <= 1e-12 * Math.max(1, Math.abs(x));
        }),
      );
    }
  });
  it('a larger reading in a unit is a larger SI value (factors positive)', () => {
    fc.assert(
      fc.property(value, value, fc.constantFrom(...pressureUnits), (x, y, u) => {
        fc.pre(x < y);
        return x * pressureFactorToPa(u)! < y * pressureFactorToPa(u)!;
      }),
    );
  });
});
