// A database and report made by the code before issue 13 (test/fixtures/pre-house, engine 0.1.0)
// still verify under the newer engine: the audit chain and the report's hash hold, the stored fit is
// not rewritten, and the recomputation says the engine changed and compares the numbers against a
// stated tolerance instead of claiming bit equality.
import { cpSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { ENGINE_VERSION } from '../../server/core/version.js';
import { engineChange } from '../../server/render/report-service.js';
import type { FitJson } from '../../server/core/analysis-contract.js';
import { efflux, root } from './run-cli.js';

const storedResult = (dir: string) => {
  const db = new Database(join(dir, 'efflux.sqlite'), { readonly: true });
  try {
    return db.prepare('SELECT result FROM fits WHERE id = 1').pluck().get() as string;
  } finally {
    db.close();
  }
};

describe('a database made before issue 13', () => {
  it('verifies under the new engine and says the engine changed, with the difference against the tolerance', () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-pre-house-'));
    cpSync(join(root, 'test/fixtures/pre-house'), dir, { recursive: true });
    const before = storedResult(dir);
    expect(JSON.parse(before).engineVersion).toBe('0.1.0');
    expect(ENGINE_VERSION).not.toBe('0.1.0');

    const r = efflux(['report', 'verify', join(dir, 'fit-1.json')], {
      env: { EFFLUX_DATA_DIR: dir },
    });
    expect(r.code, r.stdout + r.stderr).toBe(0);
    expect(r.stdout).toMatch(/fit report ec4c1ee77d2a67b2: MATCHES the records/);
    expect(r.stdout).toMatch(/ok {3}file content hash/);
    expect(r.stdout).toMatch(/ok {3}records: rebuilt from the database: same content/);
    expect(r.stdout).toMatch(/ok {3}audit record of fit 1/);
    expect(r.stdout).toMatch(/ok {3}audit chain: intact/);
    const line = r.stdout.split('\n').find((l) => l.includes('reproduce fit 1'))!;
    expect(line).toMatch(/^\s*ok /);
    expect(line).toContain(
      `the engine changed since this fit was stored (stored by 0.1.0, recomputed by ${ENGINE_VERSION})`,
    );
    expect(line).toMatch(
      /Cd·a [\d.e-]+ m² → [\d.e-]+ m², difference [-\d.e]+ m² = [\d.e-]+ % of its standard uncertainty/,
    );
    expect(line).toContain('tolerance 5 % of the stored standard uncertainty');
    expect(line).not.toMatch(/identical/);
    expect(line).toMatch(/(within|BEYOND) the tolerance/);
    // the stored result is never rewritten
    expect(storedResult(dir)).toBe(before);
  }, 120_000);
});

describe('engineChange', () => {
  const fit = (area: number, cd: number) =>
    ({
      effectiveAreaM2: { value: area, standardUncertainty: 1e-6 },
      dischargeCoefficient: { value: cd, standardUncertainty: 0.002 },
    }) as unknown as FitJson;

  it('accepts differences within 5 % of the stored standard uncertainty and refuses larger ones', () => {
    const within = engineChange(fit(1e-3, 0.61), fit(1e-3 + 4e-8, 0.61 + 0.00008));
    expect(within.ok).toBe(true);
    expect(within.text).toContain('4.0 % of its standard uncertainty');
    const outside = engineChange(fit(1e-3, 0.61), fit(1e-3 + 6e-8, 0.61));
    expect(outside.ok).toBe(false);
    expect(outside.text).toContain('6.0 % of its standard uncertainty');
  });

  it('cannot compare a result without an uncertainty', () => {
    const noU = {
      effectiveAreaM2: { value: 1e-3 },
      dischargeCoefficient: null,
    } as unknown as FitJson;
    expect(engineChange(noU, fit(1e-3, 0.61)).ok).toBe(false);
  });
});
