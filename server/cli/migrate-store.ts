/**
 * `efflux migrate-store --from DIR --to postgres://…`: a data folder's whole history copied into an
 * empty PostgreSQL database (server/store/copy-store.ts), then the copy verified against the
 * folder: every row equal, the same audit-chain head on both with the chain intact on the target,
 * the stored copies agreeing (as `audit verify`), and every fit's and outlet's report hashing the
 * same from either store. `--verify` compares a copy made earlier, copying nothing.
 * Exit 0 copied and verified, 1 the verification found a difference (each named), 2 refused.
 */
import { existsSync } from 'node:fs';
import { InputError } from '../core/errors.js';
import { verifyRecords } from '../jobs/verify-records.js';
import { fitReport, outletReport } from '../render/report-service.js';
import { currentSoftware } from '../render/software.js';
import {
  assertEmpty,
  compareStores,
  copyStore,
  planTables,
  TargetNotEmptyError,
  type CopyProgress,
} from '../store/copy-store.js';
import { isPostgresUrl, redactDatabaseUrl } from '../store/database-url.js';
import { FolderBusyError, lockDataFolder } from '../store/folder-lock.js';
import { openStore, type Store } from '../store/index.js';
import { databasePath } from '../store/maintenance.js';
import { EXIT_REFUSED, guarded } from './io.js';
import { parseCommandLine } from './options.js';

const USAGE = `usage: efflux migrate-store --from DIR --to postgres://USER@HOST/DB [--verify]
  copies the data folder's whole history (raw logger bytes, vessels, tests, fits, events, people,
  tokens, sessions, the audit chain) into an EMPTY PostgreSQL database and verifies the copy.
  --verify   compare a copy made earlier with the folder; nothing is copied
The folder is locked for the copy: stop the service on it first.
`;

const OPTIONS = {
  from: { type: 'string' },
  to: { type: 'string' },
  verify: { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
} as const;

const say = (line: string) => process.stdout.write(`${line}\n`);

/** Progress for long copies: a line when a table is done, and at most one every two seconds. */
function progressPrinter(): (p: CopyProgress) => void {
  let last = 0;
  return (p) => {
    const now = Date.now();
    if (p.copied < p.total && now - last < 2000) return;
    last = now;
    say(`  ${p.table}: ${p.copied} of ${p.total} row(s)${p.copied === p.total ? ' copied' : ''}`);
  };
}

async function ids(store: Store, table: 'fits' | 'outlets'): Promise<number[]> {
  return (await store.sql.all<{ id: number }>(`SELECT id FROM ${table} ORDER BY id`)).map((r) =>
    Number(r.id),
  );
}

/** The report's content hash, or what stopped it being built (equal on both sides too). */
async function reportHash(build: () => Promise<{ contentSha256: string }>): Promise<string> {
  try {
    return (await build()).contentSha256;
  } catch (e) {
    return `no report: ${(e as Error).message}`;
  }
}

/** Every check of the copy; returns the problems found (empty: verified). */
async function verifyCopy(source: Store, target: Store): Promise<string[]> {
  const problems: string[] = [];
  const plans = await planTables(target.sql);
  say('verifying: rows');
  const rows = await compareStores(source.sql, target.sql, plans);
  for (const d of rows.differences.slice(0, 50))
    problems.push(`table ${d.table}, row ${d.row}: ${d.what}`);
  if (rows.differences.length > 50)
    problems.push(`… and ${rows.differences.length - 50} more row difference(s)`);
  say(`  ${rows.rowsCompared} row(s) compared, ${rows.differences.length} difference(s)`);

  say('verifying: audit chain');
  const [a, b] = [await source.audit.verify(), await target.audit.verify()];
  if (!a.ok)
    problems.push(`the folder's own audit chain is broken at entry ${a.brokenAt}: ${a.reason}`);
  if (!b.ok) problems.push(`the copy's audit chain is broken at entry ${b.brokenAt}: ${b.reason}`);
  if (a.head !== b.head || a.count !== b.count)
    problems.push(
      `audit chain heads differ: folder ${a.count} entries, head ${a.head}; copy ${b.count} entries, head ${b.head}`,
    );
  say(`  folder: ${a.count} entries, head ${a.head}`);
  say(`  copy:   ${b.count} entries, head ${b.head}`);

  say('verifying: stored copies in the database (as audit verify)');
  const records = await verifyRecords(target);
  for (const d of records.differences) problems.push(d.message);
  say(`  ${records.fitsChecked} fit(s), ${records.outletsChecked} cached outlet status(es)`);

  say('verifying: report hashes');
  const software = currentSoftware();
  let reports = 0;
  for (const id of await ids(source, 'fits')) {
    const [x, y] = [
      await reportHash(() => fitReport(source, id, software)),
      await reportHash(() => fitReport(target, id, software)),
    ];
    reports++;
    if (x !== y) problems.push(`fit ${id}: report hash differs (folder ${x}, copy ${y})`);
  }
  for (const id of await ids(source, 'outlets')) {
    const [x, y] = [
      await reportHash(() => outletReport(source, id, software)),
      await reportHash(() => outletReport(target, id, software)),
    ];
    reports++;
    if (x !== y) problems.push(`outlet ${id}: report hash differs (folder ${x}, copy ${y})`);
  }
  say(`  ${reports} report(s) built from both and compared`);
  return problems;
}

export async function run(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values } = parseCommandLine(argv, OPTIONS);
    if (values.help || !values.from || !values.to) {
      (values.help ? process.stdout : process.stderr).write(USAGE);
      return values.help ? 0 : EXIT_REFUSED;
    }
    const from = values.from;
    const to = values.to;
    if (!isPostgresUrl(to))
      throw new InputError('--to must be a postgres:// or postgresql:// address');
    if (!existsSync(databasePath(from)))
      throw new InputError(`no efflux database in the data folder ${from} (${databasePath(from)})`);
    const shownTo = redactDatabaseUrl(to);
    let lock: ReturnType<typeof lockDataFolder>;
    try {
      lock = lockDataFolder(from, 'efflux migrate-store');
    } catch (e) {
      if (e instanceof FolderBusyError) throw new InputError(e.message);
      throw e;
    }
    try {
      const source = await openStore({ dataDir: from });
      try {
        if (!values.verify) await refuseForeignDatabase(to, shownTo);
        const target = await openStore({ databaseUrl: to, poolSize: 2 });
        try {
          if (!values.verify) {
            const plans = await planTables(target.sql);
            try {
              await assertEmpty(target.sql, plans, shownTo);
            } catch (e) {
              if (e instanceof TargetNotEmptyError) throw new InputError(e.message);
              throw e;
            }
            say(`copying ${databasePath(from)} into ${shownTo}`);
            const counts = await copyStore(source.sql, target.sql, plans, progressPrinter());
            say(
              `copied ${Object.values(counts).reduce((s, n) => s + n, 0)} row(s) in ${plans.length} table(s)`,
            );
          }
          const problems = await verifyCopy(source, target);
          if (problems.length) {
            say(`the copy in ${shownTo} DOES NOT MATCH the folder ${from}:`);
            for (const p of problems) say(`  ${p}`);
            return 1;
          }
          say(
            `the copy in ${shownTo} matches the folder ${from}: every row, the audit chain head, the stored copies and every report hash`,
          );
          if (!values.verify)
            say(
              'next: set EFFLUX_DATABASE_URL to that address for efflux serve; back it up with pg_dump (README: Past one machine)',
            );
          return 0;
        } finally {
          await target.close();
        }
      } finally {
        await source.close();
      }
    } finally {
      lock.release();
    }
  });
}

/** A database holding tables that are not efflux's is someone else's: refused before migrating it. */
async function refuseForeignDatabase(url: string, shown: string): Promise<void> {
  const { PostgresSql } = await import('../store/postgres-sql.js');
  const sql = new PostgresSql({ connectionString: url, max: 1 });
  try {
    const listed = await sql
      .all<{ name: string }>(
        `SELECT table_name AS name FROM information_schema.tables
         WHERE table_schema = current_schema() ORDER BY table_name`,
      )
      .catch((e: Error) => {
        // not there, not reachable, or not allowed: said in one line, exit 2
        throw new InputError(`cannot use the database ${shown}: ${e.message}`);
      });
    const tables = listed.map((r) => r.name);
    if (tables.length && !tables.includes('schema_migrations'))
      throw new InputError(
        new TargetNotEmptyError(
          shown,
          `it holds tables that efflux did not make: ${tables.slice(0, 5).join(', ')}`,
        ).message,
      );
  } finally {
    await sql.close();
  }
}
