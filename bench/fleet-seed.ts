/**
 * The invented fleet of the trend benchmarks: OUTLETS outlets × MONTHS monthly approved fits with
 * their tests and cleaning events, written straight through a store's Sql in one transaction
 * (bench/trend-service.ts on SQLite; bench/http-engines.ts copies it into PostgreSQL).
 */
import { simulateFoulingHistory } from '../server/core/trend/index.js';
import type { Sql } from '../server/store/sql.js';

const iso = (ms: number) => new Date(ms).toISOString();

export async function seedFleet(
  sql: Sql,
  OUTLETS: number,
  MONTHS: number,
  START: number,
): Promise<number> {
  const newId = async (text: string, params: (string | number | null)[]) =>
    Number(await sql.value(`${text} RETURNING id`, params));
  const t0 = performance.now();
  const sha = 'b'.repeat(64);
  await sql.tx(async () => {
    const created = iso(START);
    await sql.run(
      `INSERT INTO raw_files (sha256, size, bytes, created_at) VALUES (?, 1, x'00', ?)`,
      [sha, created],
    );
    const sites: number[] = [];
    for (const i of [1, 2, 3, 4, 5])
      sites.push(
        await newId('INSERT INTO sites (name, created_at) VALUES (?, ?)', [`site-${i}`, created]),
      );
    for (let i = 0; i < OUTLETS; i++) {
      const h = simulateFoulingHistory({
        seed: i + 1,
        months: MONTHS,
        startMs: START,
        baselineAreaM2: 1e-3 * (1 + (i % 7) / 10),
        driftPctPerYear: -((i % 11) * 0.8),
        relU: 0.005 + (i % 5) * 0.003,
        dayJitter: 4,
        maintenance: i % 3 === 0 ? [{ month: 40 + (i % 50) }] : [],
        steps: i % 97 === 0 ? [{ month: 110, pct: -8 }] : [],
      });
      const v = await newId(
        `INSERT INTO vessels (site_id, name, spec, shape, created_at, updated_at) VALUES (?, ?, ?, '{}', ?, ?)`,
        [sites[i % 5], `V-${i}`, '{}', created, created],
      );
      const o = await newId(
        `INSERT INTO outlets (vessel_id, key, bore_m, elevation_m, action_threshold, spec) VALUES (?, 'main', 0.05, 0, ?, '{}')`,
        [v, i % 4 === 0 ? 0.85 : null],
      );
      for (const f of h.fits) {
        const at = iso(f.testedAtMs);
        const t = await newId(
          `INSERT INTO drain_tests (vessel_id, outlet_id, log_sha256, log_name, settings, status, tested_at, created_at)
          VALUES (?, ?, ?, 'log.csv', '{}', 'analysed', ?, ?)`,
          [v, o, sha, at, at],
        );
        const result = JSON.stringify({
          effectiveAreaM2: { value: f.effectiveAreaM2, standardUncertainty: f.effectiveAreaU },
          dischargeCoefficient: {
            value: f.dischargeCoefficient,
            standardUncertainty: f.dischargeCoefficientU,
          },
        });
        await sql.run(
          `INSERT INTO fits (test_id, vessel_id, outlet_id, settings, vessel_spec, result, engine_version, cda_m2, cd, cda_u, cd_u,
          status, reviewed_at, created_at) VALUES (?, ?, ?, '{}', '{}', ?, 'bench', ?, ?, ?, ?, 'approved', ?, ?)`,
          [
            t,
            v,
            o,
            result,
            f.effectiveAreaM2,
            f.dischargeCoefficient,
            f.effectiveAreaU,
            f.dischargeCoefficientU,
            at,
            at,
          ],
        );
      }
      for (const e of h.events)
        await sql.run(
          `INSERT INTO maintenance_events (vessel_id, outlet_id, kind, occurred_at, created_at) VALUES (?, ?, 'cleaned', ?, ?)`,
          [v, o, iso(e.atMs), created],
        );
    }
  });
  return performance.now() - t0;
}
