import { describe, expect, it } from 'vitest';
import { efflux } from './run-cli.js';

const vessel = 'sample-data/backwash-tank-fb1.vessel.json';
const g = 9.80665;

describe('efflux plan', () => {
  it('FB-1 from 3.5 m, 1 mm, 1.5 mm, 1 s (--json): drain time within 0.5 % of the closed form, a recommendation for 0.2 %', () => {
    const r = efflux([
      'plan',
      '--vessel',
      vessel,
      '--from',
      '3.5m',
      '--resolution',
      '1mm',
      '--noise',
      '1.5mm',
      '--interval',
      '1s',
      '--target',
      '0.2%',
      '--json',
    ]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const plan = JSON.parse(r.stdout);
    // closed form for an upright cylinder (field notes): t = 2A/(Cd·a·√2g)·√H0, D = 3.2 m, d = 50 mm, Cd 0.61, H0 = 3.5 m
    const closed =
      ((2 * Math.PI * 3.2 ** 2) / 4 / (0.61 * ((Math.PI * 0.05 ** 2) / 4) * Math.sqrt(2 * g))) *
      Math.sqrt(3.5);
    expect(Math.abs(plan.test.drainTimeToOutletS / closed - 1)).toBeLessThan(0.005);
    expect(plan.target.possible).toBe(true);
    expect(plan.recommendation.shortest.uncertainty.effectiveAreaRelative).toBeLessThanOrEqual(
      0.002,
    );
    expect(plan.recommendation.shortest.durationS).toBeLessThan(plan.test.durationS);
  });

  it('the text report names the peak beside the limit, the target verdict and the cautions', () => {
    const r = efflux([
      'plan',
      '--vessel',
      vessel,
      '--from',
      '3.5m',
      '--noise',
      '1.5mm',
      '--interval',
      '1s',
      '--target-cd',
      '0.2%',
      '--discharge-limit',
      '8L/s',
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/EXCEEDS the stated limit of 8 L\/s/);
    expect(r.stdout).toMatch(/CANNOT be met/);
    expect(r.stdout).toMatch(/bore tolerance alone/);
    expect(r.stdout).toMatch(/Confined space/);
  });

  it('refuses bad options with one line naming the option (exit 2)', () => {
    const bad = efflux([
      'plan',
      '--vessel',
      vessel,
      '--from',
      '3.5',
      '--noise',
      '1.5mm',
      '--interval',
      '1s',
    ]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--from: "3.5" has no unit/);
    const high = efflux([
      'plan',
      '--vessel',
      vessel,
      '--from',
      '9m',
      '--noise',
      '1.5mm',
      '--interval',
      '1s',
    ]);
    expect(high.code).toBe(2);
    expect(high.stderr).toMatch(/--from/);
    const noInterval = efflux(['plan', '--vessel', vessel, '--from', '3m', '--noise', '1.5mm']);
    expect(noInterval.code).toBe(2);
    expect(noInterval.stderr).toMatch(/--interval/);
    expect(bad.stderr.split('\n').filter(Boolean)).toHaveLength(1);
  });
});
