import { describe, expect, it } from 'vitest';
import { simulateFoulingHistory } from '../../../server/core/trend/simulate.js';
import { splitEpochs } from '../../../server/core/trend/epochs.js';
import { epochLine } from '../../../server/core/trend/trendline.js';
import { detectStep, CUSUM_H } from '../../../server/core/trend/step.js';

const START = Date.UTC(2018, 0, 1);

function check(
  seed: number,
  o: { months: number; drift: number; step?: number; stepMonth?: number; understate?: number },
) {
  const h = simulateFoulingHistory({
    seed,
    months: o.months,
    startMs: START,
    baselineAreaM2: 1.5e-3,
    driftPctPerYear: o.drift,
    relU: 0.01,
    steps: o.step ? [{ month: o.stepMonth ?? 24, pct: o.step }] : [],
  });
  const fits = h.fits.map((f) => ({
    ...f,
    effectiveAreaU: f.effectiveAreaU / (o.understate ?? 1),
  }));
  const ep = splitEpochs(fits, [])[0];
  return { fits, r: detectStep(ep.fits, epochLine(ep, 'effectiveArea')!.fit) };
}
const month = (id: string | null) => (id === null ? NaN : Number(id.slice(-4)));

describe('detectStep', () => {
  it('finds a blockage of 8 % (8 standard uncertainties) and places it at the step', () => {
    const N = 200;
    let found = 0,
      placed = 0,
      prompt = 0;
    for (let s = 0; s < N; s++) {
      const { r } = check(100 + s, { months: 36, drift: -5, step: -8, stepMonth: 24 });
      if (!r.flagged) continue;
      found++;
      expect(r.direction).toBe('drop');
      if (month(r.fitId) >= 22 && month(r.fitId) <= 24) placed++;
      if (month(r.alarmFitId) - 24 <= 1) prompt++;
    }
    expect(found / N).toBeGreaterThanOrEqual(0.99);
    expect(placed / N).toBeGreaterThanOrEqual(0.9);
    expect(prompt / N).toBeGreaterThanOrEqual(0.95);
  });

  it("flags a blockage in this month's test at once", () => {
    let found = 0;
    for (let s = 0; s < 50; s++) {
      const { fits, r } = check(700 + s, { months: 30, drift: -3, step: -8, stepMonth: 29 });
      // The alarm is this test; the change start is the CUSUM's estimate (up to 2 tests earlier
      // when the down-sum was already off zero), as in the placement check above.
      if (r.flagged && r.alarmFitId === fits[29].fitId && r.latestZ! < -3 && month(r.fitId) >= 27)
        found++;
    }
    expect(found / 50).toBeGreaterThanOrEqual(0.96);
  });

  it('rarely raises a false alarm on clean histories, drifting or not, over 10 years of monthly tests', () => {
    const N = 200;
    for (const drift of [0, -6]) {
      let alarms = 0;
      for (let s = 0; s < N; s++) if (check(3000 + s, { months: 120, drift }).r.flagged) alarms++;
      // Per history of 117 checked tests; the latest-test rule alone would give ~0.3 % (3σ, normal).
      expect(alarms / N).toBeLessThanOrEqual(0.03);
    }
  });

  it('keeps false alarms rare when the stated uncertainties are half the real scatter', () => {
    let alarms = 0;
    for (let s = 0; s < 200; s++)
      if (check(6000 + s, { months: 60, drift: -4, understate: 2 }).r.flagged) alarms++;
    expect(alarms / 200).toBeLessThanOrEqual(0.05);
  });

  it('says there is too little to compare with a short epoch, and no change in a clean one', () => {
    const short = check(1, { months: 3, drift: -5 });
    expect(short.r.flagged).toBe(false);
    expect(short.r.latestZ).toBeNull();
    const clean = check(2, { months: 24, drift: -5 });
    expect(clean.r.reason).toMatch(new RegExp(`below ${CUSUM_H}`));
    expect(Number.isNaN(clean.r.z[2]) && Number.isFinite(clean.r.z[3])).toBe(true);
  });
});
