import { describe, expect, it } from 'vitest';
import { thresholdOf } from '../../server/jobs/trend.js';

describe("an outlet's action threshold", () => {
  it('below 1 is a loss of effective area (fouling)', () => {
    expect(thresholdOf({ actionThreshold: 0.9 }).pct).toBe(-10);
  });
  it('above 1 is a gain (erosion)', () => {
    expect(thresholdOf({ actionThreshold: 1.15 }).pct).toBe(15);
  });
  it('none, or a meaningless one, falls back to the default −10 %', () => {
    expect(thresholdOf({ actionThreshold: null }).fraction).toBeNull();
    expect(thresholdOf({ actionThreshold: 1 }).fraction).toBeNull();
  });
});
