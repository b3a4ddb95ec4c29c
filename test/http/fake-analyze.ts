/**
 * A stand-in for server/core/analyze.ts for the HTTP-mechanics tests: it reads "t,level" lines and
 * refuses a non-number the way the real reader does (InputError with file/line/field). Its numbers
 * mean nothing; tests through the real engine live in engine.test.ts.
 */
import type { AnalysisOutcome, AnalysisRequest } from '../../server/core/analysis-contract.js';
import { InputError } from '../../server/core/errors.js';

/** The window start the stand-in reports for a dated log (the test's date when none is stated). */
export const FAKE_LOG_START = '2025-03-01T08:00:00.000Z';

export function analyzeDrainTest(req: AnalysisRequest): AnalysisOutcome {
  const text = new TextDecoder().decode(req.log.bytes);
  const lines = text.split('\n');
  let rows = 0;
  for (let i = 1; i < lines.length; i++) {
    if (lines[i].trim() === '') continue;
    const level = lines[i].split(',')[1];
    if (level === undefined || !Number.isFinite(Number(level))) {
      throw new InputError(`"${level ?? ''}" is not a number`, {
        file: req.log.fileName,
        line: i + 1,
        field: 'level',
      });
    }
    rows++;
  }
  if (rows < 2) throw new InputError('fewer than two readings', { file: req.log.fileName });
  return {
    detected: {
      rows,
      settingsSeen: req.settings,
      vesselName: (req.vessel as { name?: string }).name ?? null,
    },
    fit: {
      engineVersion: 'fake-1',
      converged: true,
      dischargeCoefficient: { value: 0.6, standardUncertainty: 0.01, ci95: [0.58, 0.62] },
      effectiveAreaM2: { value: 4e-4, standardUncertainty: 1e-5, ci95: [3.8e-4, 4.2e-4] },
      // a log whose header says "elapsed" has no clock; the others are dated by this fixed start
      window: {
        startS: 0,
        endS: rows - 1,
        samples: rows,
        startTime: /elapsed/i.test(lines[0]) ? null : FAKE_LOG_START,
      },
      warnings: [],
      timing: { parseMs: 0, fitMs: 0 },
      ...fakeDiagnostics(4e-4, 1e-5, rows),
      window_setting: req.settings.window ?? null,
    },
  };
}

/** The members every fit result has (core/fit-result/schema.ts), for a fake Cd·a ± u. */
export function fakeDiagnostics(cda: number, u: number, samples: number) {
  return {
    parameters: [
      {
        name: 'effectiveAreaM2',
        unit: 'm²',
        free: true,
        value: cda,
        standardUncertainty: u,
        ci95: [cda - 2 * u, cda + 2 * u] as [number, number],
        start: cda,
      },
    ],
    correlations: { parameters: ['effectiveAreaM2'], matrix: [[1]] },
    solver: { method: 'fake', stopReason: 'fake', converged: true, iterations: 0 },
    residuals: { samples, rmseM: 0, maxAbsM: 0, lag1Autocorrelation: null, durbinWatson: null },
  };
}

export const fakeAnalyze = async (req: AnalysisRequest) => analyzeDrainTest(req);
