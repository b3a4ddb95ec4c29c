import MLR from 'ml-regression-multivariate-linear';
import { describe, expect, it } from 'vitest';
import {
  DAY_MS,
  epochLine,
  newTestUAt,
  outletTrendDetailed,
  predictNewTest,
  seededNormal,
  splitEpochs,
  testSchedule,
  weightedLine,
  YEAR_MS,
  type ApprovedFit,
} from '../../../server/core/trend/index.js';
import { checkIntervalDays } from '../../../server/core/trend/due.js';

describe('prediction interval for a new test', () => {
  it('matches a hand-worked straight line: s²(1 + 1/n + (t − t̄)²/Sxx)', () => {
    // Worked by hand: t = 0..4 years, y = 10, 9.8, 9.9, 9.5, 9.4, equal u = 0.01 (the scatter is far
    // larger, so the Birge factor applies and the weighted line is the ordinary one):
    // t̄ = 2, Sxx = 10, ȳ = 9.72, Sxy = −1.50 → b = −0.15, a = 10.02; residuals −0.02, −0.07, 0.18,
    // −0.07, −0.02 → SSE = 0.043, s² = 0.043/3. At t = 6: ŷ = 9.12,
    // var = s²(1 + 1/5 + 16/10) = 0.0143333·2.8 = 0.0401333; t_{0.975,3} = 3.182 (Student t
    // table) → half-width 3.1824·0.20033 = 0.6376.
    const t = Float64Array.from([0, 1, 2, 3, 4]);
    const y = Float64Array.from([10, 9.8, 9.9, 9.5, 9.4]);
    const u = new Float64Array(5).fill(0.01);
    const line = weightedLine(t, y, u);
    expect(line.slope).toBeCloseTo(-0.15, 12);
    expect(line.intercept).toBeCloseTo(10.02, 12);
    expect(newTestUAt(line, 6) ** 2).toBeCloseTo(0.0401333333, 9);
    expect(line.tQuantile95 * newTestUAt(line, 6)).toBeCloseTo(0.6376, 3);
    // the band of the mean alone is narrower: s²(1/5 + 16/10) = 0.0258
    expect(newTestUAt(line, 6)).toBeGreaterThan(Math.sqrt(0.0258) * 1.2);
  });

  it('agrees with ml-regression-multivariate-linear 2.0.4: s² + x₀ᵀ·Cov(β)·x₀', () => {
    // Reference: ml-regression-multivariate-linear (npm) ordinary least squares with intercept;
    // its stdError is s and stdErrorMatrix is s²(XᵀX)⁻¹. Equal stated u's smaller than the scatter.
    for (let seed = 1; seed <= 4; seed++) {
      const nrm = seededNormal(seed);
      const n = 15;
      const t = Float64Array.from({ length: n }, (_, i) => i / 12);
      const u = new Float64Array(n).fill(1e-6);
      const y = Float64Array.from(t, (ti) => 7.5e-4 - 2e-5 * ti + 4e-6 * nrm());
      const ours = weightedLine(t, y, u);
      expect(ours.scaled).toBe(true);
      const ref = new MLR(
        Array.from(t, (ti) => [ti]),
        Array.from(y, (yi) => [yi]),
      );
      const cov = ref.stdErrorMatrix.to2DArray(); // rows/cols: slope, intercept (intercept last)
      for (const at of [0.5, 1.5, 3]) {
        const x0 = [at, 1];
        let q = 0;
        for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) q += x0[i] * cov[i][j] * x0[j];
        const refVar = ref.stdError ** 2 + q;
        expect(newTestUAt(ours, at) ** 2 / refVar - 1).toBeCloseTo(0, 8);
      }
    }
  });
});

describe('test schedule', () => {
  const day0 = Date.UTC(2026, 2, 7);
  it('is due interval days after the latest test and overdue after that', () => {
    const s = testSchedule(day0, 180, 'site', day0 + 100 * DAY_MS);
    expect(s.nextDueMs).toBe(day0 + 180 * DAY_MS);
    expect(s.daysUntilDue).toBeCloseTo(80, 9);
    expect(s.overdue).toBe(false);
    const late = testSchedule(day0, 180, 'outlet', day0 + 273 * DAY_MS);
    expect(late.overdue).toBe(true);
    expect(late.latestTestAgeDays).toBeCloseTo(273, 9);
    expect(late.daysUntilDue).toBeCloseTo(-93, 9);
  });
  it('an outlet never tested is due at once', () => {
    const s = testSchedule(null, 30, 'site', day0);
    expect(s.overdue).toBe(true);
    expect(s.neverTested).toBe(true);
    expect(s.nextDueMs).toBeNull();
  });
  it('refuses intervals that are not whole days from 1 to 3660', () => {
    for (const bad of [0, -5, 1.5, 4000, Number.NaN, '30'])
      expect(() => checkIntervalDays(bad)).toThrow(/whole number of days/);
    expect(checkIntervalDays(30)).toBe(30);
  });
});

describe('trend segments and the forecast of a new test', () => {
  const t0 = Date.UTC(2024, 0, 10);
  const approved = (i: number, v: number): ApprovedFit => ({
    fitId: String(i + 1),
    testedAtMs: t0 + i * 30 * DAY_MS,
    effectiveAreaM2: v,
    effectiveAreaU: 1e-6,
    dischargeCoefficient: v / 1.2e-3,
    dischargeCoefficientU: 1e-6 / 1.2e-3,
  });
  it('breaks the line at a flagged step: each side its own line, none through the step', () => {
    const nrm = seededNormal(5);
    const fits = Array.from({ length: 14 }, (_, i) =>
      approved(i, 7.5e-4 * (i >= 9 ? 0.93 : 1) + 1e-6 * nrm()),
    );
    const { trend: tr, details } = outletTrendDetailed(
      fits,
      [],
      { actionThresholdPct: -10 },
      t0 + 500 * DAY_MS,
    );
    expect(tr.epochs[0].step?.flagged).toBe(true);
    const ep = details[0];
    expect(ep.segments.length).toBe(2);
    expect(ep.segments[1].startedBy).toBe('step');
    expect(ep.segments[0].fitIds).toEqual(fits.slice(0, 9).map((f) => f.fitId));
    // each side's line stays near its own level: no line drawn through the 7 % drop
    const before = ep.segments[0].area!,
      after = ep.segments[1].area!;
    expect(Math.abs(before.fit.intercept / 7.5e-4 - 1)).toBeLessThan(0.01);
    const atStep = after.fit.intercept; // t = 0 is the segment's first test
    expect(Math.abs(atStep / (7.5e-4 * 0.93) - 1)).toBeLessThan(0.01);
    // the prediction of the next test comes from the stretch after the step
    expect(Math.abs(ep.newTestNow!.value / (7.5e-4 * 0.93) - 1)).toBeLessThan(0.02);
  });
  it('one segment when no step is flagged; the new-test interval widens with time since the last test', () => {
    const nrm = seededNormal(9);
    const fits = Array.from({ length: 12 }, (_, i) =>
      approved(i, 7.5e-4 - 1e-7 * i + 1e-6 * nrm()),
    );
    const last = fits[fits.length - 1].testedAtMs;
    const soon = outletTrendDetailed(fits, [], { actionThresholdPct: -10 }, last + DAY_MS).details;
    const late = outletTrendDetailed(
      fits,
      [],
      { actionThresholdPct: -10 },
      last + 270 * DAY_MS,
    ).details;
    expect(soon[0].segments.length).toBe(1);
    const a = soon[0].newTestNow!,
      b = late[0].newTestNow!;
    expect(b.halfWidth95).toBeGreaterThan(a.halfWidth95);
    // and it is the prediction of predictNewTest on the epoch line
    const line = epochLine(splitEpochs(fits, [])[0], 'effectiveArea')!;
    expect(b.halfWidth95).toBe(predictNewTest(line, last + 270 * DAY_MS).halfWidth95);
    expect(YEAR_MS).toBe(365.25 * DAY_MS);
  });
});
