// The one fit-result shape (server/core/fit-result/schema.ts): fits stored by engine 0.1.0 still
// read through it, fresh single and joint fits follow it, and the API publishes it.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../../server/core/analyze.js';
import { singleFitResult } from '../../../server/core/fit-result/schema.js';
import { testApp } from '../../http/helpers.js';

const root = join(import.meta.dirname, '../../..');
const sample = (name: string) => join(root, 'sample-data', name);

describe('the single-fit result', () => {
  it('reads a fit stored by engine 0.1.0 (test/fixtures/pre-house) unchanged', () => {
    const db = new Database(join(root, 'test/fixtures/pre-house/efflux.sqlite'), {
      readonly: true,
    });
    const stored = JSON.parse(
      db.prepare('SELECT result FROM fits WHERE id = 1').pluck().get() as string,
    );
    db.close();
    const parsed = singleFitResult.parse(stored);
    expect(parsed.engineVersion).toBe('0.1.0');
    // loose objects: nothing is dropped on the way through
    expect(parsed).toEqual(stored);
  });

  it('a fresh fit names every parameter with value, free or fixed, bounds, uncertainty, interval and start', () => {
    const fit = analyzeDrainTest({
      log: {
        bytes: readFileSync(sample('fb1-2026-03-10-preamble.csv')),
        fileName: 'fb1-2026-03-10-preamble.csv',
      },
      vessel: JSON.parse(readFileSync(sample('backwash-tank-fb1.vessel.json'), 'utf8')),
      settings: {},
    }).fit;
    const r = singleFitResult.parse(fit);
    const area = r.parameters.find((p) => p.name === 'effectiveAreaM2')!;
    expect(area).toMatchObject({ free: true, unit: 'm²', bounds: { lower: 0, upper: null } });
    expect(area.standardUncertainty).toBeGreaterThan(0);
    expect(area.start).toBeGreaterThan(0);
    const exponent = r.parameters.find((p) => p.name === 'headExponent')!;
    expect(exponent).toMatchObject({
      free: false,
      value: 0.5,
      standardUncertainty: null,
      bounds: { lower: 0.5, upper: 0.5 },
    });
    expect(r.correlations.parameters).toEqual(
      r.parameters.filter((p) => p.free).map((p) => p.name),
    );
    expect(r.solver).toMatchObject({ converged: true, rank: 2 });
  });

  it('is published in the OpenAPI document as the fit result', async () => {
    const t = await testApp();
    const doc = (await t.app.inject({ method: 'GET', url: '/api/openapi.json' })).json();
    await t.app.close();
    expect(doc.components.schemas.FitResult.properties.parameters.type).toBe('array');
    expect(doc.components.schemas.Fit.properties.result.$ref).toBe(
      '#/components/schemas/FitResult',
    );
  });
});
// the joint fit's shape is checked on a real joint fit in test/cli/system.test.ts
