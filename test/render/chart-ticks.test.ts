/** Calendar date ticks, value tick labels and durations for reports (hand-worked expectations). */
import { describe, expect, it } from 'vitest';
import { dateTicks } from '../../server/render/chart-ticks.js';
import { daysText, tickText, uncertaintyIn } from '../../server/render/report-format.js';

const ms = (iso: string) => Date.parse(iso);

describe('dateTicks', () => {
  it('spreads 30 months over the first of every sixth month (3-monthly would be 10 ticks)', () => {
    const t = dateTicks(ms('2024-10-07T00:00:00Z'), ms('2027-04-12T00:00:00Z'), 7);
    expect(t.map((x) => x.label)).toEqual(['2025-01', '2025-07', '2026-01', '2026-07', '2027-01']);
    expect(t[0].value).toBe(ms('2025-01-01T00:00:00Z'));
  });
  it('puts three weeks on Mondays (2026-03-01 is a Sunday)', () => {
    const t = dateTicks(ms('2026-03-01T00:00:00Z'), ms('2026-03-21T00:00:00Z'), 7);
    expect(t.map((x) => x.label)).toEqual(['2026-03-02', '2026-03-09', '2026-03-16']);
  });
  it('labels days within a week', () => {
    const t = dateTicks(ms('2026-03-01T12:00:00Z'), ms('2026-03-05T12:00:00Z'), 7);
    expect(t.map((x) => x.label)).toEqual(['2026-03-02', '2026-03-03', '2026-03-04', '2026-03-05']);
  });
  it('counts whole years over a decade', () => {
    const t = dateTicks(ms('2020-06-01T00:00:00Z'), ms('2031-02-01T00:00:00Z'), 7);
    expect(t.map((x) => x.label)).toEqual(['2022', '2024', '2026', '2028', '2030']);
  });
});

describe('tick labels and durations', () => {
  it('gives ticks the decimals of their step, never exponents', () => {
    const f = tickText([700, 720, 740]);
    expect([700, 720, 740].map(f)).toEqual(['700', '720', '740']);
    const g = tickText([0.605, 0.61, 0.615]);
    expect([0.605, 0.61, 0.615].map(g)).toEqual(['0.605', '0.610', '0.615']);
    const z = tickText([-5e-17, 2.5, 5]); // a step of 2.5 needs one decimal; a rounding residue is zero
    expect(z(-5e-17)).toBe('0.0');
    expect(z(2.5)).toBe('2.5');
  });
  it('says days under 90, months under two years, years after', () => {
    expect(daysText(45)).toBe('45 days');
    expect(daysText(129)).toBe('4 months'); // 129 / 30.4375 = 4.2
    expect(daysText(3386)).toBe('9.3 years'); // 3386 / 365.25 = 9.27
  });
});

describe('uncertainties', () => {
  it('keep two significant digits in fixed notation, trailing zeros included', () => {
    expect(uncertaintyIn(1e-4, 'm', 'si')).toBe('0.00010');
    expect(uncertaintyIn(2.8e-4, '1', 'si')).toBe('0.00028');
    expect(uncertaintyIn(1.2e-6, 'm²', 'si')).toBe('1.2'); // shown in mm²
    expect(uncertaintyIn(7.8e-6, 'm³/s', 'si')).toBe('0.0078'); // shown in L/s
    expect(uncertaintyIn(1234, 'm', 'si')).toBe('1200');
    // US units: 1 in² = 6.4516e-4 m² exactly (NIST SP 811 B.8); 1.2e-6 / 6.4516e-4 = 0.00186
    expect(uncertaintyIn(1.2e-6, 'm²', 'us')).toBe('0.0019');
  });
});
