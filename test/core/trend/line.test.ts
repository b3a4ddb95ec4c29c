import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import MLR from 'ml-regression-multivariate-linear';
import { weightedLine, lineAt, lineUAt } from '../../../server/core/trend/line.js';
import { seededNormal, seededUniform } from '../../../server/core/trend/simulate.js';
import { InputError } from '../../../server/core/errors.js';

const lre = (est: number, cert: number) => -Math.log10(Math.abs(est - cert) / Math.abs(cert));

function norris() {
  // NIST StRD linear dataset Norris (see data/README.md), read by content.
  const text = readFileSync(fileURLToPath(new URL('./data/Norris.dat', import.meta.url)), 'utf8');
  const lines = text.split('\n');
  const num = (re: RegExp) => {
    const m = lines.map((l) => l.match(re)).find(Boolean);
    if (!m) throw new Error(`not in Norris.dat: ${re}`);
    return m.slice(1).map(Number);
  };
  const [b0, sd0] = num(/^\s+B0\s+(\S+)\s+(\S+)/);
  const [b1, sd1] = num(/^\s+B1\s+(\S+)\s+(\S+)/);
  const [rsd] = num(/^\s+Standard Deviation\s+(\S+)/);
  const start = lines.findIndex((l) => /^Data:\s+y\s+x/.test(l));
  const rows = lines
    .slice(start + 1)
    .filter((l) => l.trim())
    .map((l) => l.trim().split(/\s+/).map(Number));
  return {
    b0,
    sd0,
    b1,
    sd1,
    rsd,
    y: Float64Array.from(rows, (r) => r[0]),
    x: Float64Array.from(rows, (r) => r[1]),
  };
}

describe('weightedLine', () => {
  it('reproduces the NIST StRD certified values for Norris (unit weights)', () => {
    const d = norris();
    expect(d.x.length).toBe(36); // the dataset says 36 observations
    const fit = weightedLine(d.x, d.y, new Float64Array(36).fill(1));
    // NIST StRD certified values, LRE = −log10 of the relative error (the StRD's own score).
    expect(lre(fit.intercept, d.b0)).toBeGreaterThanOrEqual(12);
    expect(lre(fit.slope, d.b1)).toBeGreaterThanOrEqual(12);
    // With unit weights the residual standard deviation is the Birge ratio, and NIST's standard
    // deviations of the estimates are the internal ones times it.
    expect(lre(fit.birgeRatio, d.rsd)).toBeGreaterThanOrEqual(10);
    expect(lre(fit.internal.uIntercept * fit.birgeRatio, d.sd0)).toBeGreaterThanOrEqual(10);
    expect(lre(fit.internal.uSlope * fit.birgeRatio, d.sd1)).toBeGreaterThanOrEqual(10);
    expect(fit.dof).toBe(34);
  });

  it('agrees with ml-regression-multivariate-linear on rows scaled by sqrt(w)', () => {
    // Reference: ml-regression-multivariate-linear 2.0.4 (npm), ordinary least squares without
    // intercept on design rows [√w, √w·t] and responses √w·y — the textbook reduction of WLS to OLS.
    for (let seed = 1; seed <= 5; seed++) {
      const nrm = seededNormal(seed),
        uni = seededUniform(seed + 99);
      const n = 24;
      const t = new Float64Array(n),
        y = new Float64Array(n),
        u = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        t[i] = i / 12 + 0.02 * uni();
        u[i] = 1e-5 * (0.5 + 2 * uni());
        y[i] = 1.2e-3 - 4e-5 * t[i] + u[i] * nrm();
      }
      const fit = weightedLine(t, y, u);
      const X = Array.from(t, (ti, i) => [1 / u[i], ti / u[i]]);
      const Y = Array.from(y, (yi, i) => [yi / u[i]]);
      const ref = new MLR(X, Y, { intercept: false });
      expect(fit.intercept / ref.weights[0][0] - 1).toBeCloseTo(0, 9);
      expect(fit.slope / ref.weights[1][0] - 1).toBeCloseTo(0, 8);
      // Its standard errors use s² = SSR/(n − p): ours times the Birge ratio.
      expect((fit.internal.uIntercept * fit.birgeRatio) / ref.stdErrors[0] - 1).toBeCloseTo(0, 7);
      expect((fit.internal.uSlope * fit.birgeRatio) / ref.stdErrors[1] - 1).toBeCloseTo(0, 7);
      expect(fit.chi2 / (ref.stdError ** 2 * (n - 2)) - 1).toBeCloseTo(0, 8);
    }
  });

  it('widens by the Birge ratio when the scatter exceeds the stated u, and never narrows', () => {
    const n = 30,
      nrm = seededNormal(7);
    const t = Float64Array.from({ length: n }, (_, i) => i / 12);
    const u = new Float64Array(n).fill(1e-5);
    const big = Float64Array.from(t, () => 1e-3 + 3e-5 * nrm()); // 3× the stated u
    const wide = weightedLine(t, big, u);
    expect(wide.scaled).toBe(true);
    expect(wide.uSlope).toBeCloseTo(wide.internal.uSlope * wide.birgeRatio, 20);
    expect(wide.lackOfFitP).toBeLessThan(1e-6);
    const small = Float64Array.from(t, () => 1e-3 + 0.3e-5 * nrm());
    const tight = weightedLine(t, small, u);
    expect(tight.scaled).toBe(false);
    expect(tight.uSlope).toBe(tight.internal.uSlope);
  });

  it('its 95 % slope interval covers the true slope in about 95 % of seeds, honest or understated u', () => {
    for (const understate of [1, 3]) {
      let hit = 0;
      const N = 300;
      for (let s = 0; s < N; s++) {
        const nrm = seededNormal(1000 + s);
        const n = 12;
        const t = Float64Array.from({ length: n }, (_, i) => i / 12);
        const u = Float64Array.from({ length: n }, (_, i) => 1e-5 * (1 + (i % 3)));
        const y = Float64Array.from(t, (ti, i) => 1e-3 - 5e-5 * ti + u[i] * understate * nrm());
        const f = weightedLine(t, y, u);
        if (f.slopeInterval95.lower <= -5e-5 && -5e-5 <= f.slopeInterval95.upper) hit++;
      }
      // 95 % nominal; with understated u the Birge-scaled t interval is exact (common practice).
      expect(hit / N).toBeGreaterThan(0.91);
      expect(hit / N).toBeLessThan(0.99);
    }
  });

  it('gives the uncertainty of the line value consistently with its covariance', () => {
    const t = Float64Array.from([0, 1, 2, 3.5]),
      y = Float64Array.from([1, 0.9, 0.85, 0.7]),
      u = Float64Array.from([0.02, 0.03, 0.02, 0.05]);
    const f = weightedLine(t, y, u);
    for (const x of [-1, 0, 2, 10]) {
      const v = f.uIntercept ** 2 + 2 * x * f.covInterceptSlope + x * x * f.uSlope ** 2;
      expect(lineUAt(f, x) / Math.sqrt(v) - 1).toBeCloseTo(0, 10);
    }
    expect(lineAt(f, 0)).toBe(f.intercept);
  });

  it('refuses what it cannot fit', () => {
    const a = Float64Array.from([0, 1, 2]);
    expect(() => weightedLine(a, a, Float64Array.from([1, 0, 1]))).toThrow(InputError);
    expect(() => weightedLine(a.subarray(0, 2), a.subarray(0, 2), a.subarray(0, 2))).toThrow(
      InputError,
    );
    expect(() => weightedLine(new Float64Array(3), a, Float64Array.from([1, 1, 1]))).toThrow(
      InputError,
    );
    expect(() => weightedLine(a, a.subarray(0, 2), a)).toThrow(InputError);
  });
});
