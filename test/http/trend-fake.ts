import { fakeDiagnostics } from './fake-analyze.js';
/**
 * A stand-in analysis for the trend tests: the log's first line states the result,
 * "cda=<m²>,u=<m²>", so a test sets each month's Cd·a exactly. Cd = Cd·a / (π·0.03²/4).
 */
import type { AnalysisOutcome, AnalysisRequest } from '../../server/core/analysis-contract.js';

const NOMINAL = (Math.PI * 0.03 ** 2) / 4;

export function logFor(cda: number, u: number): Buffer {
  return Buffer.from(`cda=${cda},u=${u}\n0,2.0\n1,1.9\n`);
}

export async function trendAnalyze(req: AnalysisRequest): Promise<AnalysisOutcome> {
  const m = /^cda=([^,]+),u=([^\n]+)/.exec(new TextDecoder().decode(req.log.bytes))!;
  const cda = Number(m[1]),
    u = Number(m[2]);
  return {
    detected: {},
    fit: {
      engineVersion: 'trend-fake-1',
      converged: true,
      dischargeCoefficient: {
        value: cda / NOMINAL,
        standardUncertainty: Math.hypot(u / cda, 0.004) * (cda / NOMINAL),
        ci95: [0, 1],
      },
      effectiveAreaM2: { value: cda, standardUncertainty: u, ci95: [cda - 2 * u, cda + 2 * u] },
      window: { startS: 0, endS: 1, samples: 2 },
      warnings: [],
      timing: { parseMs: 0, fitMs: 0 },
      ...fakeDiagnostics(cda, u, 2),
    },
  };
}
