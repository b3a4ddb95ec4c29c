import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { jointFitResult } from '../../server/core/fit-result/schema.js';
import { describe, expect, it } from 'vitest';
import { efflux, root } from './run-cli.js';

const dir = join(root, 'sample-data/systems');
const truth = JSON.parse(readFileSync(join(dir, 'truth.json'), 'utf8'));
// a system file that states its outlets' Cd (so steady needs no fit)
const KNOWN = join(root, 'node_modules/.cache/efflux-known.system.json');
mkdirSync(join(root, 'node_modules/.cache'), { recursive: true });
const known = JSON.parse(readFileSync(join(dir, 'filter-chain.system.json'), 'utf8'));
for (const v of known.vessels) v.dischargeCoefficient = 0.61;
writeFileSync(KNOWN, JSON.stringify(known));

describe('efflux fit-system, steady, linearize', () => {
  for (const t of truth.tests) {
    it(`${t.system}: fit-system recovers the recorded Cd of every outlet within 0.5 %, inside the 95 % interval`, () => {
      const args = [
        'fit-system',
        t.system,
        ...Object.entries(t.logs).flatMap(([id, f]) => ['--log', `${id}=${f}`]),
        '--json',
      ];
      const r = efflux(args, { cwd: dir });
      expect(r.stderr).toBe('');
      expect(r.code).toBe(0);
      const out = JSON.parse(r.stdout);
      expect(out.converged).toBe(true);
      for (const [id, v] of Object.entries(
        t.truth as Record<string, { dischargeCoefficient: number; effectiveAreaM2: number }>,
      )) {
        const cd = out.outlets[id].dischargeCoefficient;
        expect(Math.abs(cd.value / v.dischargeCoefficient - 1)).toBeLessThan(0.005);
        const a = out.outlets[id].effectiveAreaM2;
        expect(a.ci95[0]).toBeLessThanOrEqual(v.effectiveAreaM2);
        expect(a.ci95[1]).toBeGreaterThanOrEqual(v.effectiveAreaM2);
      }
      expect(out.correlations.parameters.length).toBe(out.correlations.matrix.length);
      // the one fit-result shape (core/fit-result/schema.ts), as for a single vessel
      const parsed = jointFitResult.safeParse(out);
      expect(parsed.success, JSON.stringify(parsed.error?.issues.slice(0, 3))).toBe(true);
      const area = out.parameters.find((p: { name: string }) =>
        p.name.endsWith('.effectiveAreaM2'),
      );
      expect(area).toMatchObject({ unit: 'm²', free: true, bounds: { lower: 0, upper: null } });
      expect(area.start).toBeGreaterThan(0);
      expect(out.solver.converged).toBe(true);
    }, 30_000);
  }

  it('steady from a system file with stated Cd: no uncertainty, flows balance', () => {
    const r = efflux(['steady', KNOWN, '--inflow', 'FT1=1L/s', '--json']);
    expect(r.code).toBe(0);
    const body = JSON.parse(r.stdout);
    expect(body.vessels.BT2.outflowM3S).toBeCloseTo(0.001, 10);
    expect(body.vessels.BT2.levelM.standardUncertainty).toBeNull();
  });

  it('steady and linearize take the fit JSON; text, csv and json formats', () => {
    const t = truth.tests[1];
    const fit = efflux(
      [
        'fit-system',
        t.system,
        ...Object.entries(t.logs).flatMap(([id, f]) => ['--log', `${id}=${f}`]),
        '--json',
      ],
      { cwd: dir },
    );
    const tmp = join(root, 'node_modules/.cache/efflux-system-fit.json');
    mkdirSync(join(root, 'node_modules/.cache'), { recursive: true });
    writeFileSync(tmp, fit.stdout);
    const s = efflux(['steady', tmp, '--inflow', '2.5L/s', '--json']);
    expect(s.code).toBe(0);
    const body = JSON.parse(s.stdout);
    expect(body.vessels.RC1.outflowM3S).toBeCloseTo(0.0025, 9);
    expect(body.vessels.RC1.levelM.standardUncertainty).toBeGreaterThan(0);
    for (const f of ['text', 'csv', 'json'])
      expect(efflux(['linearize', tmp, '--inflow', '1L/s', '--format', f]).code).toBe(0);
    const text = efflux(['linearize', tmp, '--inflow', '1L/s', '--format', 'text']).stdout;
    expect(text).toMatch(/per m in RC1, 1\/s/);
    expect(text).not.toMatch(/\[[^\]]*;[^\]]*\]|eye\(/s);
  }, 60_000);

  it.each([
    [
      ['fit-system', 'filter-chain.system.json', '--log', 'FT1=ft1-2026-04-07.csv'],
      /no log given for BT2/,
    ],
    [
      ['fit-system', 'filter-chain.system.json', '--log', 'XX=ft1-2026-04-07.csv'],
      /no vessel has id "XX"/,
    ],
    [['steady', 'filter-chain.system.json', '--inflow', '1L/s'], /vessels\.0\.effectiveAreaM2/],
    [['steady', KNOWN, '--inflow', 'lots'], /--inflow/],
    [['steady', KNOWN, '--inflow', 'ZZ=1L/s'], /no vessel has id "ZZ"/],
    [['linearize', 'truth.json', '--inflow', '1L/s', '--format', 'pdf'], /--format/],
  ])('refuses bad input with exit 2 and one line: %j', (args, message) => {
    const r = efflux(args as string[], { cwd: dir });
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(r.stderr).toMatch(message);
  });
});
