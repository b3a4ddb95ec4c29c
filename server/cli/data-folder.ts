/**
 * `efflux backup --out FILE`, `efflux restore FILE`, `efflux check`: the data folder's database
 * copied online and verified, put back, or checked (server/store/maintenance.ts does the work).
 * Each takes `--data DIR` (else EFFLUX_DATA_DIR, else ./data). Exit 0 done, 1 the check found a
 * fault, 2 refused (bad option, no database, folder busy, newer schema).
 */
import { InputError } from '../core/errors.js';
import { lockDataFolder } from '../store/folder-lock.js';
import { openStore } from '../store/index.js';
import {
  backupDatabase,
  BackupCheckError,
  BackupRefusedError,
  checkDatabaseFile,
  databasePath,
  NoDatabaseError,
  restoreDatabase,
  type DatabaseCheck,
} from '../store/maintenance.js';
import { EXIT_REFUSED } from './io.js';
import { parseCommandLine } from './options.js';
import { dataDir } from './serve-config.js';

const say = (line: string) => process.stdout.write(`${line}\n`);
const countsLine = (c: Record<string, number>) =>
  ['vessels', 'drain_tests', 'fits', 'maintenance_events', 'users', 'audit_log']
    .filter((t) => t in c)
    .map((t) => `${t} ${c[t]}`)
    .join(', ');

function refuse(e: unknown): number {
  if (e instanceof NoDatabaseError || e instanceof InputError) {
    process.stderr.write(`efflux: ${e instanceof InputError ? e.toLine() : e.message}\n`);
    return EXIT_REFUSED;
  }
  throw e;
}

function printCheck(c: DatabaseCheck): void {
  say(
    `integrity: ${c.integrity.length === 1 && c.integrity[0] === 'ok' ? 'ok' : c.integrity.slice(0, 5).join('; ')}`,
  );
  say(
    `schema: database ${c.schema.database}, this build ${c.schema.build}${c.schema.database < c.schema.build ? ' (the service migrates on its next start, after a backup)' : ''}`,
  );
  say(
    c.chain.ok
      ? `audit chain intact: ${c.chain.count} entries; head ${c.chain.head}`
      : `audit chain BROKEN at entry ${c.chain.brokenAt}: ${c.chain.reason}`,
  );
  say(`rows: ${countsLine(c.counts)}`);
}

export async function runBackup(argv: string[]): Promise<number> {
  const { values } = parseCommandLine(argv, {
    out: { type: 'string' },
    data: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help || !values.out) {
    (values.help ? process.stdout : process.stderr).write(
      'usage: efflux backup --out FILE [--data DIR]   (online; the copy is checked before it is kept)\n',
    );
    return values.help ? 0 : EXIT_REFUSED;
  }
  try {
    const r = await backupDatabase(dataDir(process.env, { flag: values.data }), values.out);
    say(`backup written: ${r.out} (${r.bytes} bytes)`);
    printCheck(r.check);
    say(
      'copy checked: integrity ok, audit chain intact, row counts equal to the source at the snapshot copied',
    );
    return 0;
  } catch (e) {
    if (e instanceof BackupCheckError) {
      process.stderr.write(`efflux: ${e.message}\n`);
      return 1;
    }
    if (e instanceof BackupRefusedError) return refuse(new InputError(e.message));
    return refuse(e);
  }
}

export async function runCheck(argv: string[]): Promise<number> {
  const { values } = parseCommandLine(argv, {
    data: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) {
    say(
      'usage: efflux check [--data DIR]   (integrity, schema version, audit chain; exit 1 on a fault)',
    );
    return 0;
  }
  try {
    const c = await checkDatabaseFile(databasePath(dataDir(process.env, { flag: values.data })));
    printCheck(c);
    for (const p of c.problems) process.stderr.write(`efflux: ${p}\n`);
    return c.ok ? 0 : 1;
  } catch (e) {
    return refuse(e);
  }
}

export async function runRestore(argv: string[]): Promise<number> {
  const { values, positionals } = parseCommandLine(argv, {
    data: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help || positionals.length !== 1) {
    (values.help ? process.stdout : process.stderr).write(
      'usage: efflux restore FILE [--data DIR]   (refused while a server holds the folder; the replaced database is kept)\n',
    );
    return values.help ? 0 : EXIT_REFUSED;
  }
  const dir = dataDir(process.env, { flag: values.data });
  try {
    const lock = lockDataFolder(dir, 'efflux restore'); // FolderBusyError → exit 2 in main.ts
    try {
      const r = await restoreDatabase(dir, positionals[0], new Date().toISOString());
      // bring it to this build's schema now (a pre-migration copy is taken first), so the next start is plain
      await (await openStore({ dataDir: dir })).close();
      say(`restored ${positionals[0]} into ${databasePath(dir)}`);
      if (r.keptAs) say(`the database it replaced is kept as ${r.keptAs}`);
      printCheck(r.check);
      return 0;
    } finally {
      lock.release();
    }
  } catch (e) {
    if (e instanceof BackupCheckError) {
      process.stderr.write(
        `efflux: ${positionals[0]} is not a sound backup: ${e.problems.join('; ')}; nothing was changed\n`,
      );
      return 1;
    }
    return refuse(e);
  }
}
