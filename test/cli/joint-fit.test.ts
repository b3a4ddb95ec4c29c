/**
 * `steady`, `linearize` and `predict` on a joint fit stored in the data folder (--joint-fit ID),
 * and the linear model's own text layout (no borrowed matrix-literal syntax). The fit is the
 * pump-fed sample system (sample-data/systems, invented), stored as the service stores it.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jointFitResult } from '../../server/core/fit-result/schema.js';
import { systemFitAnswer } from '../../server/jobs/system-fit.js';
import { openStore, SYSTEM_ACTOR } from '../../server/store/index.js';
import { effluxWithData, root } from './run-cli.js';

const dir = join(root, 'sample-data/systems');
const file = (name: string) => ({
  fileName: name,
  bytes: new Uint8Array(readFileSync(join(dir, name))),
});
let data: string;

beforeAll(async () => {
  data = mkdtempSync(join(tmpdir(), 'efflux-joint-cli-'));
  const store = await openStore({ dataDir: data });
  const system = file('wash-transfer.system.json');
  const logs: [string, ReturnType<typeof file>][] = [
    ['WT4', file('wt4-2026-04-09.csv')],
    ['HT5', file('ht5-2026-04-09.csv')],
  ];
  const flows: [string, ReturnType<typeof file>][] = [['WT4', file('pump-2026-04-09.csv')]];
  const { drawing, ...result } = systemFitAnswer({ system, logs, flows, fields: {} });
  await store.jointFits.create(SYSTEM_ACTOR, {
    site: 'Kestrel Fen works (fictional)',
    systemName: 'Wash water transfer (fictional)',
    settings: {},
    result: jointFitResult.parse(result),
    drawing,
    notes: null,
    files: [
      { role: 'system', vessel: '', ...system },
      ...logs.map(([vessel, f]) => ({ role: 'level' as const, vessel, ...f })),
      ...flows.map(([vessel, f]) => ({ role: 'inflow' as const, vessel, ...f })),
    ],
  });
  await store.close();
}, 120_000);
afterAll(() => rmSync(data, { recursive: true, force: true }));

describe('--joint-fit ID', () => {
  it('steady: at equilibrium every outlet passes the inflow (mass balance), with intervals', () => {
    const r = effluxWithData(data, [
      'steady',
      '--joint-fit',
      '1',
      '--inflow',
      'WT4=0.65L/s',
      '--json',
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/joint fit 1 is a draft/);
    const body = JSON.parse(r.stdout);
    // a chain with no other inflow: each vessel's outflow equals what enters the top one
    expect(body.vessels.WT4.outflowM3S).toBeCloseTo(0.00065, 9);
    expect(body.vessels.HT5.outflowM3S).toBeCloseTo(0.00065, 9);
    expect(body.vessels.WT4.levelM.standardUncertainty).toBeGreaterThan(0);
  }, 60_000);

  it('linearize: labelled tables, no matrix literal; --json and --csv', () => {
    const text = effluxWithData(data, ['linearize', '--joint-fit', '1', '--inflow', 'WT4=0.65L/s']);
    expect(text.code, text.stderr).toBe(0);
    expect(text.stdout).not.toMatch(/\[[^\]]*;[^\]]*\]/s);
    expect(text.stdout).not.toMatch(/eye\(/);
    expect(text.stdout).toContain('per m in WT4, 1/s');
    expect(text.stdout).toContain('per m³/s into HT5, 1/m²');
    const json = effluxWithData(data, [
      'linearize',
      '--joint-fit',
      '1',
      '--inflow',
      'WT4=0.65L/s',
      '--json',
    ]);
    expect(json.code).toBe(0);
    const lm = JSON.parse(json.stdout);
    expect(lm.ids).toEqual(['WT4', 'HT5']);
    // a free jet: HT5's level does not act on WT4, so A(WT4, HT5) is zero; B is diag(1/area)
    expect(lm.a[1].value).toBe(0);
    expect(lm.b[0].value).toBeCloseTo(1 / ((Math.PI * 1.2 ** 2) / 4), 10);
    const csv = effluxWithData(data, [
      'linearize',
      '--joint-fit',
      '1',
      '--inflow',
      'WT4=0.65L/s',
      '--csv',
    ]);
    expect(csv.code).toBe(0);
    expect(csv.stdout.split('\n')[0]).toBe(
      'matrix,row,column,value,standard_uncertainty,ci95_low,ci95_high',
    );
  }, 60_000);

  it('predict from the stored fit', () => {
    const r = effluxWithData(data, [
      'predict',
      '--joint-fit',
      '1',
      '--from',
      'WT4=1.5m',
      '--from',
      'HT5=0.5m',
      '--after',
      '60s',
      '--json',
    ]);
    expect(r.code, r.stderr).toBe(0);
    const body = JSON.parse(r.stdout);
    expect(body.levelsM.WT4.value).toBeLessThan(1.5);
    expect(body.levelsM.WT4.ci95[0]).toBeLessThan(body.levelsM.WT4.value);
  }, 60_000);

  it.each([
    [['linearize', '--joint-fit', '7', '--inflow', '1L/s'], /no joint fit 7/],
    [['linearize', 'x.json', '--joint-fit', '1', '--inflow', '1L/s'], /not both/],
    [['linearize', '--joint-fit', 'one', '--inflow', '1L/s'], /--joint-fit takes the number/],
    [['linearize', '--joint-fit', '1', '--inflow', '1L/s', '--json', '--csv'], /one output form/],
  ])('refuses %j with exit 2 and one line', (args, message) => {
    const r = effluxWithData(data, args as string[]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
  });
});
