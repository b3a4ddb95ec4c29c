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
    expect(q.relativeStandardUncertainty).toBeCloseTo(Math.sqrt(0.004 ** 2 + (2 * urBore) ** 2), 12);
    // Welch–Satterthwaite: the infinite-dof bore term raises ν_eff above the fit's 50
    expect(q.effectiveDegreesOfFreedom).toBeGreaterThan(50);
    expect(q.expandedUncertainty).toBeCloseTo(q.coverageFactor * q.standardUncertainty, 14);
    expect(q.coverageFactor).toBeGreaterThan(1.96);
    expect(q.coverageFactor).toBeLessThan(2.01);
  });
});
