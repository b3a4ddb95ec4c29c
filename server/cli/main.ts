#!/usr/bin/env node
/**
 * The `efflux` command: a thin dispatcher. Each command lives in its own module exporting
 * `run(argv: string[]): Promise<number>` (the exit code); modules load only when used, so
 * `efflux fit` never loads the server.
 */
import { helpColumns } from './help-columns.js';
import { EXIT_INTERNAL, EXIT_REFUSED } from './io.js';

/** Service-side commands load by name so the offline commands never pull in the server. */
const loadModule = (name: string) =>
  import(`./${name}.js`) as Promise<{ run: (argv: string[]) => Promise<number> | number }>;

type Command = {
  summary: string;
  load: () => Promise<{ run: (argv: string[]) => Promise<number> | number }>;
};

const COMMANDS: Record<string, Command> = {
  fit: {
    summary: 'fit a drain test log: Cd·a and Cd with uncertainty',
    load: async () => ({ run: (await import('./fit.js')).runFit }),
  },
  inspect: {
    summary: 'show what was read from a log and the drain windows found, without fitting',
    load: async () => ({ run: (await import('./inspect.js')).runInspect }),
  },
  'fit-system': {
    summary: "fit connected vessels jointly: every outlet's Cd·a and Cd",
    load: async () => ({ run: (await import('./system.js')).runFitSystem }),
  },
  steady: {
    summary: 'equilibrium levels of connected vessels at a given inflow',
    load: async () => ({ run: (await import('./system.js')).runSteady }),
  },
  linearize: {
    summary: 'state-space model (A, B) and time constants about an operating point',
    load: async () => ({ run: (await import('./system.js')).runLinearize }),
  },
  predict: {
    summary:
      'connected vessels: levels after a time, or the time to drain to a level, with 95 % intervals',
    load: async () => ({ run: (await import('./system.js')).runPredict }),
  },
  plan: {
    summary:
      'plan a drain test: drain time, volume, peak flow, expected u of Cd·a and Cd, least test for a target',
    load: () => loadModule('plan'),
  },
  watch: {
    summary: 'tail a growing logger file into a live drain test on a service',
    load: () => loadModule('watch'),
  },
  serve: { summary: 'start the service (API and web workbench)', load: () => loadModule('serve') },
  token: {
    summary: 'API tokens: token create --role ROLE --name NAME | token list | token revoke ID',
    load: () => loadModule('token'),
  },
  people: {
    summary: 'people, roles and site limits: people list | add | change | revoke',
    load: () => loadModule('people'),
  },
  site: {
    summary:
      'site settings: site self-review SITE on|off | site clock SITE [--time-zone Z] [--interval D]',
    load: async () => ({ run: (await import('./due.js')).runSite }),
  },
  due: {
    summary: 'outlets overdue or soon due for a drain test, soonest first: due [--site S]',
    load: async () => ({ run: (await import('./due.js')).runDue }),
  },
  audit: { summary: 'check the audit log: audit verify', load: () => loadModule('audit') },
  report: {
    summary: 'fit and outlet reports (PDF/JSON) and report verify',
    load: () => loadModule('report'),
  },
  trend: {
    summary: "an outlet's Cd·a trend and forecast, or the fleet: trend <outletId> | trend --fleet",
    load: () => loadModule('trend'),
  },
  'migrate-store': {
    summary:
      'copy a data folder into an empty PostgreSQL database and verify the copy: migrate-store --from DIR --to postgres://…',
    load: () => loadModule('migrate-store'),
  },
  backup: {
    summary: "copy the data folder's database online and check the copy: backup --out FILE",
    load: async () => ({ run: (await import('./data-folder.js')).runBackup }),
  },
  restore: {
    summary: 'put a checked backup in place (refused while a server runs): restore FILE',
    load: async () => ({ run: (await import('./data-folder.js')).runRestore }),
  },
  check: {
    summary: 'check the data folder: integrity, schema version, audit chain',
    load: async () => ({ run: (await import('./data-folder.js')).runCheck }),
  },
  vessel: {
    summary: 'vessels: vessel add FILE | list | show | export | edit ID FILE | revisions',
    load: () => loadModule('vessel'),
  },
  outlet: {
    summary:
      "an outlet's settings: outlet threshold TAG|ID FACTOR|default | outlet interval TAG|ID DAYS|site",
    load: async () => ({ run: (await import('./due.js')).runOutlet }),
  },
  export: {
    summary: 'approved fits of a site, vessel or period as one zip with hashes',
    load: () => loadModule('export'),
  },
};

function usage(): string {
  const lines = [
    'usage: efflux <command> [options]   (efflux <command> --help for more)',
    '',
    'commands:',
  ];
  lines.push(...helpColumns(Object.entries(COMMANDS).map(([name, c]) => [name, c.summary])));
  lines.push(
    '',
    'Drain tests involve work at height, confined spaces and discharges: follow site procedures.',
  );
  return lines.join('\n') + '\n';
}

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(usage());
    return name ? 0 : EXIT_REFUSED;
  }
  if (name === '--version') {
    const { ENGINE_VERSION, PACKAGE_VERSION } = await import('../core/version.js');
    process.stdout.write(`efflux ${PACKAGE_VERSION} (engine ${ENGINE_VERSION})\n`);
    return 0;
  }
  const command = COMMANDS[name];
  if (!command) {
    process.stderr.write(`efflux: unknown command "${name}"\n${usage()}`);
    return EXIT_REFUSED;
  }
  let mod: Awaited<ReturnType<Command['load']>>;
  try {
    mod = await command.load();
  } catch (err) {
    process.stderr.write(
      `efflux: the "${name}" command is not available in this build (${(err as Error).message})\n`,
    );
    return EXIT_INTERNAL;
  }
  try {
    return await mod.run(rest);
  } catch (err) {
    // the operator's situation, not a bug: one line naming it, exit 2
    const refusals = [
      'SettingsError',
      'FolderBusyError',
      'NewerSchemaError',
      'DemoRefusedError',
      'NoDatabaseError',
    ];
    if (err instanceof Error && refusals.includes(err.name)) {
      process.stderr.write(`efflux: ${err.message}\n`);
      return EXIT_REFUSED;
    }
    if (err instanceof Error && err.name === 'MigrationError') {
      process.stderr.write(`efflux: ${err.message}\n`);
      return EXIT_INTERNAL;
    }
    throw err;
  }
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err) => {
    process.stderr.write(
      `efflux: internal fault: ${err instanceof Error ? err.message : String(err)}\n`,
    );
    process.exitCode = EXIT_INTERNAL;
  },
);
