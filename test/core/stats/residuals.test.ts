import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../../server/core/errors.js';
import { residualDiagnostics } from '../../../server/core/stats/index.js';

describe('residualDiagnostics', () => {
  it('alternating signs: r₁ = −3/4, DW = 3 (by hand)', () => {
    // Σ rₜrₜ₊₁ = −3 over Σ r² = 4; Σ(Δr)² = 3·4 = 12 over 4.
    const d = residualDiagnostics(Float64Array.from([1, -1, 1, -1]));
    expect(d).toEqual({ n: 4, rmse: 1, mean: 0, lag1Autocorrelation: -0.75, durbinWatson: 3 });
  });
  it('a ramp 1,2,3,4: mean 2.5, r₁ = 1/4, DW = 0.1 (by hand)', () => {
    // Deviations ±1.5, ±0.5: Σd² = 5, Σdₜdₜ₊₁ = 0.75 − 0.25 + 0.75 = 1.25. Σr² = 30, Σ(Δr)² = 3.
    const d = residualDiagnostics(Float64Array.from([1, 2, 3, 4]));
    expect(d.mean).toBe(2.5);
    expect(d.rmse).toBeCloseTo(Math.sqrt(7.5), 15);
    expect(d.lag1Autocorrelation).toBeCloseTo(0.25, 15);
    expect(d.durbinWatson).toBeCloseTo(0.1, 15);
  });
  it('leaves undefined quantities undefined (NaN), and refuses no residuals', () => {
    const one = residualDiagnostics(Float64Array.from([2]));
    expect(one.rmse).toBe(2);
    expect(one.lag1Autocorrelation).toBeNaN();
    expect(one.durbinWatson).toBeNaN();
    expect(residualDiagnostics(Float64Array.from([3, 3, 3])).lag1Autocorrelation).toBeNaN();
    expect(() => residualDiagnostics(new Float64Array(0))).toThrow(InputError);
  });
  it('keeps r₁ in [−1, 1] and DW in [0, 4]', () => {
    // Both bounds follow from the Cauchy–Schwarz inequality (ordinary algebra).
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 2, maxLength: 50 }),
        (xs) => {
          const d = residualDiagnostics(Float64Array.from(xs));
          if (!Number.isNaN(d.lag1Autocorrelation)) {
            expect(Math.abs(d.lag1Autocorrelation)).toBeLessThanOrEqual(1 + 1e-12);
          }
          if (!Number.isNaN(d.durbinWatson)) {
            expect(d.durbinWatson).toBeGreaterThanOrEqual(0);
            expect(d.durbinWatson).toBeLessThanOrEqual(4 + 1e-12);
          }
        },
      ),
    );
  });
});
