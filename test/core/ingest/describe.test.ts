import { describe, expect, it } from 'vitest';
import { describeLog } from '../../../server/core/ingest/describe.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';

describe('describeLog', () => {
  it('gives columns, span, interval, gaps, notes and warnings', () => {
    const times = [0, 10, 20, 30, 40, 100, 110];
    const text = `Site: test rig\nTimestamp,Level [cm],Temp °C\n${times.map((t, i) => `${new Date(Date.UTC(2026, 4, 4, 10) + t * 1000).toISOString()},${100 - i},${15 + i}`).join('\n')}\n`;
    const d = describeLog(readLevelLog(new TextEncoder().encode(text), 'log.csv'));
    expect(d.samples).toBe(7);
    expect(d.start).toBe('2026-05-04T10:00:00.000Z');
    expect(d.end).toBe('2026-05-04T10:01:50.000Z');
    expect(d.durationS).toBe(110);
    expect(d.medianIntervalS).toBe(10);
    expect(d.gaps).toEqual([{ afterLine: 7, startS: 40, endS: 100, durationS: 60 }]);
    expect(d.columns.map((c) => c.unit)).toEqual([null, 'cm', '°C']);
    expect(d.level.maxM).toBe(1);
    expect(d.level.firstM).toBe(1);
    expect(d.level.minM).toBeCloseTo(0.94, 12);
    expect(d.level.lastM).toBe(d.level.minM);
    expect(d.temperatureC).toEqual({ min: 15, max: 21 });
    expect(d.metadata[0].key).toBe('Site');
    expect(d.warnings.map((w) => w.code)).toContain('gaps');
  });
});
