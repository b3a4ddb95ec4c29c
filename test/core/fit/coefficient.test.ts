import { describe, expect, it } from 'vitest';
import { dischargeCoefficientQuantity } from '../../../server/core/fit/coefficient.js';

describe('discharge coefficient from effective area (JCGM 100:2008 vocabulary)', () => {
  it('combines the fit and a rectangular bore tolerance in quadrature (GUM 4.3.7 and 5.1.6)', () => {
    const d = 0.04;
    const a = (Math.PI * d * d) / 4;
    const cdA = 0.61 * a;
    const q = dischargeCoefficientQuantity(cdA, 0.004 * cdA, 50, d, 0.0002);
    const urBore = 0.0002 / Math.sqrt(3) / d;
    expect(q.value).toBeCloseTo(0.61, 12);
    expect(q.relativeStandardUncertainty).toBeCloseTo(
      Math.sqrt(0.004 ** 2 + (2 * urBore) ** 2),
      12,
    );
    // Welch–Satterthwaite (GUM G.2b): ν_eff = u_c⁴ / (u_fit⁴/50 + u_bore⁴/∞), worked by hand:
    // u_r,c² = 0.004² + (2·0.0002/√3/0.04)² = 4.9333e-5, so ν_eff = 50 · (4.9333e-5)² / 0.004⁴ = 475.3
    expect(q.effectiveDegreesOfFreedom).toBeCloseTo(475.35, 1);
    // coverage factor from a published t table (NIST/SEMATECH e-Handbook 1.3.6.7.2, from memory):
    // t(0.975, 120) = 1.980 and t(0.975, ∞) = 1.960 bracket t(0.975, 475)
    expect(q.coverageFactor).toBeGreaterThan(1.96);
    expect(q.coverageFactor).toBeLessThan(1.98);
    expect(q.expandedUncertainty / q.standardUncertainty).toBeCloseTo(q.coverageFactor, 12);
  });
});
