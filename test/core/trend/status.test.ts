import { describe, expect, it } from 'vitest';
import { simulateFoulingHistory } from '../../../server/core/trend/simulate.js';
import { splitEpochs } from '../../../server/core/trend/epochs.js';
import { outletStatus, fleetOrder, type OutletStatus } from '../../../server/core/trend/status.js';
import { outletTrend, BAND_POINTS } from '../../../server/core/trend/outlet.js';
import { YEAR_MS } from '../../../server/core/trend/trendline.js';
import { InputError } from '../../../server/core/errors.js';

const START = Date.UTC(2021, 0, 1);
const DAY = 86_400_000;
const sim = (seed: number, months: number, drift: number, extra: object = {}) =>
  simulateFoulingHistory({
    seed,
    months,
    startMs: START,
    baselineAreaM2: 1e-3,
    driftPctPerYear: drift,
    relU: 0.01,
    ...extra,
  });
const nowAfter = (h: { fits: { testedAtMs: number }[] }) =>
  h.fits[h.fits.length - 1].testedAtMs + 5 * DAY;

describe('splitEpochs', () => {
  it('starts an epoch at each maintenance event, the first fit of each being its baseline', () => {
    const h = sim(1, 30, -5, { maintenance: [{ month: 12 }, { month: 20, kind: 'replaced' }] });
    const eps = splitEpochs([...h.fits].reverse(), h.events);
    expect(eps.map((e) => e.fits.length)).toEqual([12, 8, 10]);
    expect(eps[1].baseline!.fitId).toBe(h.fits[12].fitId);
    expect(eps[2].startedBy!.kind).toBe('replaced');
    expect(eps[0].startMs).toBe(h.fits[0].testedAtMs);
  });
  it('keeps an epoch with no test yet, and refuses bad input', () => {
    const h = sim(1, 6, 0);
    const eps = splitEpochs(h.fits, [{ atMs: nowAfter(h), kind: 'cleaned' }]);
    expect(eps.length).toBe(2);
    expect(eps[1].baseline).toBeNull();
    expect(() => splitEpochs([{ ...h.fits[0], effectiveAreaU: 0 }], [])).toThrow(InputError);
    expect(() => splitEpochs(h.fits, [{ atMs: 0, kind: 'painted' as never }])).toThrow(InputError);
  });
});

describe('outletStatus', () => {
  const settings = { actionThresholdPct: -10 };
  it('names each situation in plain words with a reason', () => {
    const cases: [string, OutletStatus][] = [
      ['not enough tests', outletStatus(sim(1, 2, -5).fits, [], settings, START + 90 * DAY)],
      ['drifting', outletStatus(sim(3, 24, -2).fits, [], settings, START + 2 * YEAR_MS)],
      ['action due soon', outletStatus(sim(4, 24, -4.5).fits, [], settings, START + 2 * YEAR_MS)],
      ['past threshold', outletStatus(sim(5, 36, -6).fits, [], settings, START + 3 * YEAR_MS)],
      [
        'sudden change',
        outletStatus(
          sim(6, 24, -1, { steps: [{ month: 18, pct: -6 }] }).fits,
          [],
          { actionThresholdPct: -30 },
          START + 2 * YEAR_MS,
        ),
      ],
    ];
    for (const [word, st] of cases) {
      expect(st.status, st.reason).toBe(word);
      expect(st.reason.length).toBeGreaterThan(15);
    }
    const soon = cases[2][1];
    expect(soon.daysToThreshold!).toBeGreaterThan(0);
    expect(soon.daysToThreshold!).toBeLessThanOrEqual(180);
  });
  it('calls a clean outlet steady, except where its 95 % slope interval misses zero by chance', () => {
    let steady = 0;
    for (let s = 0; s < 100; s++)
      if (
        outletStatus(sim(200 + s, 24, 0).fits, [], settings, START + 2 * YEAR_MS).status ===
        'steady'
      )
        steady++;
    expect(steady).toBeGreaterThanOrEqual(88); // 95 expected
  });
  it('restarts after a cleaning: a fouled outlet just cleaned is not past its threshold', () => {
    const h = sim(7, 40, -6, { maintenance: [{ month: 36 }] });
    const st = outletStatus(h.fits, h.events, settings, nowAfter(h));
    expect(st.epochIndex).toBe(1);
    expect(st.testsInEpoch).toBe(4);
    expect(st.status).not.toBe('past threshold');
  });
  it('refuses a zero threshold', () => {
    expect(() => outletStatus(sim(1, 5, 0).fits, [], { actionThresholdPct: 0 }, START)).toThrow(
      InputError,
    );
  });
});

describe('fleetOrder', () => {
  it('orders by days to threshold, unknown last and the more severe of those first', () => {
    const mk = (status: OutletStatus['status'], d: number | null, id: string) => ({
      status,
      daysToThreshold: d,
      id,
      reason: '',
      crossingMs: null,
      epochIndex: 0,
      testsInEpoch: 0,
      latestTestMs: null,
      latestChangePct: null,
      slopePctPerYear: null,
      thresholdPct: -10,
    });
    const order = fleetOrder([
      mk('steady', null, 'a'),
      mk('drifting', 400, 'b'),
      mk('past threshold', -30, 'c'),
      mk('sudden change', null, 'd'),
      mk('action due soon', 20, 'e'),
      mk('not enough tests', null, 'f'),
    ]);
    expect(order.map((s) => s.id)).toEqual(['c', 'e', 'b', 'd', 'f', 'a']);
  });
});

describe('outletTrend', () => {
  it('serves per-epoch series, both lines, bands, threshold, forecast, step and status', () => {
    const h = sim(8, 48, -4, { maintenance: [{ month: 24 }] });
    const now = nowAfter(h);
    const tr = outletTrend(h.fits, h.events, { actionThresholdPct: -12 }, now);
    expect(tr.epochs.length).toBe(2);
    const cur = tr.epochs[1];
    expect(cur.series.length).toBe(24);
    expect(cur.series[0].changePct).toBe(0);
    expect(cur.area!.quantity).toBe('effectiveArea');
    expect(cur.cd!.quantity).toBe('dischargeCoefficient');
    // Cd is Cd·a over a fixed bore area in the simulation: same % slope.
    expect(cur.cd!.slopePctPerYear).toBeCloseTo(cur.area!.slopePctPerYear, 6);
    expect(cur.areaBand.length).toBe(BAND_POINTS);
    for (const p of cur.areaBand) expect(p.lower < p.value && p.value < p.upper).toBe(true);
    expect(cur.areaBand[BAND_POINTS - 1].atMs).toBeGreaterThanOrEqual(now);
    expect(cur.thresholdM2).toBeCloseTo(cur.series[0].effectiveAreaM2 * 0.88, 15);
    expect(cur.forecast).not.toBeNull();
    expect(cur.step).not.toBeNull();
    expect(tr.epochs[0].forecast).toBeNull();
    expect(tr.status).toEqual(outletStatus(h.fits, h.events, { actionThresholdPct: -12 }, now));
    // What the API sends must survive JSON.
    expect(() => JSON.stringify(tr)).not.toThrow();
  });
});
