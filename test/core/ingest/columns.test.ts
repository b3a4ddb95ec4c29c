import { describe, expect, it } from 'vitest';
import { InputError } from '../../../server/core/errors.js';
import { readHeader } from '../../../server/core/ingest/header.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

const read = (s: string, o = {}) => readLevelLog(new TextEncoder().encode(s), 'log.csv', o);

describe('column roles and units from header text', () => {
  const cases: [string, string, string | null][] = [
    ['Level [cm]', 'level', 'cm'],
    ['level_mm', 'level', 'mm'],
    ['Stage (ft)', 'level', 'ft'],
    ['Pressure (psi)', 'gauge-pressure', 'psi'],
    ['P_abs kPa', 'absolute-pressure', 'kPa'],
    ['Baro (hPa)', 'absolute-pressure', 'hPa'],
    ['Temp °F', 'temperature', '°F'],
    ['Distance to surface (m)', 'distance-from-top', 'm'],
    ['Timestamp', 'time', null],
    ['Date', 'date', null],
    ['Time', 'time', null],
    ['Elapsed (s)', 'time', 's'],
    ['t [min]', 'time', 'min'],
    ['epoch_ms', 'time', 'ms'],
    ['Battery (V)', 'other', 'V'],
  ];
  for (const [h, role, unit] of cases) {
    it(`"${h}" is ${role}${unit ? ` in ${unit}` : ''}`, () => {
      const r = readHeader(h);
      expect(r.role).toBe(role);
      expect(r.unit).toBe(unit);
      expect(r.reason).toContain(h);
    });
  }
  it('records every column with its role, unit and reason', () => {
    const s = read(
      'Stamp,Level [cm],Temp °C,Battery (V)\n2026-05-04 10:00:00,100,12,3.6\n2026-05-04 10:00:01,99,12,3.6\n',
    );
    expect(s.columns.map((c) => [c.role, c.unit])).toEqual([
      ['time', null],
      ['level', 'cm'],
      ['temperature', '°C'],
      ['other', 'V'],
    ]);
    expect(s.columns[3].reason).toMatch(/not used/);
  });
  it('refuses a level column without a unit, asking for --unit', () => {
    const e = (() => {
      try {
        read('Stamp,Level\n2026-05-04 10:00:00,1\n2026-05-04 10:00:01,1\n');
      } catch (x) {
        return x as InputError;
      }
    })();
    expect(e).toBeInstanceOf(InputError);
    expect(e!.message).toMatch(/--unit/);
    expect(e!.field).toBe('Level');
  });
  it('takes --unit when the header has none', () => {
    const s = read('Stamp,Level\n2026-05-04 10:00:00,100\n2026-05-04 10:00:01,90\n', {
      unit: 'mm',
    });
    expect(Array.from(s.levelM)).toEqual([0.1, 0.09]);
  });
  it('chooses columns by name or index when told', () => {
    const text = 'A,B,C\n2026-05-04 10:00:00,1,5\n2026-05-04 10:00:01,2,6\n';
    expect(Array.from(read(text, { timeColumn: 'a', levelColumn: 'C', unit: 'm' }).levelM)).toEqual(
      [5, 6],
    );
    expect(Array.from(read(text, { timeColumn: 1, levelColumn: 2, unit: 'm' }).levelM)).toEqual([
      1, 2,
    ]);
    expect(() => read(text, { levelColumn: 'D', unit: 'm' })).toThrow(/no column named "D"/);
  });
  it('overrides the role with --quantity', () => {
    const s = read('Stamp,Reading (m)\n2026-05-04 10:00:00,0.5\n2026-05-04 10:00:01,0.6\n', {
      quantity: 'distance-from-top',
      mountElevationM: 3,
    });
    expect(Array.from(s.levelM)).toEqual([2.5, 2.4]);
    expect(s.columns[1].role).toBe('distance-from-top');
  });
});
