/**
 * `efflux report fit <fitId> --out file.pdf [--json]`, `efflux report outlet <outletId> --out file.pdf
 * [--json] [--as-of TIME]`, `efflux report verify <file.pdf|file.json>`: reports from the database in
 * EFFLUX_DATA_DIR (the folder `efflux serve` uses). verify exits 0 when the file matches the
 * records, 1 naming what differs.
 */
import { writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import { InputError } from '../core/errors.js';
import { reportJson } from '../core/report/index.js';
import {
  fitReport,
  outletReport,
  renderFitReportPdf,
  renderOutletReportPdf,
  verifyReport,
} from '../render/report-service.js';
import { currentSoftware } from '../render/software.js';
import { openStore, type Store } from '../store/index.js';
import { NotFoundError } from '../store/errors.js';
import { guarded, readInputFile } from './io.js';
import { outletByName } from './names.js';
import { parseCommandLine } from './options.js';
import { UNITS_HELP, unitsFrom } from './units-option.js';
import { storeLocation } from './serve-config.js';

const USAGE = () => `usage:
  efflux report fit <fitId> --out FILE [--json | --units si|us]
      one fit's report (PDF, or JSON with --json)
  efflux report outlet OUTLET --out FILE [--json | --units si|us] [--as-of TIME]
      an outlet's approved fits and trend (OUTLET: its id, its tag, or VESSEL/OUTLET)
  efflux report verify <file.pdf|file.json>
      check a report against the records (a PDF is re-rendered in the units it names)
  ${UNITS_HELP}
The database is the one in EFFLUX_DATA_DIR (default ./data), as for efflux serve.
`;

const OPTIONS = {
  out: { type: 'string' },
  json: { type: 'boolean' },
  'as-of': { type: 'string' },
  units: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

function idArg(s: string | undefined, what: string): number {
  if (!s || !/^\d+$/.test(s)) throw new InputError(`give the ${what} id as a whole number`);
  return Number(s);
}

async function withStore<T>(body: (store: Store) => Promise<T>): Promise<T> {
  const store = await openStore(storeLocation());
  return body(store).finally(() => store.close());
}

async function notFoundAsRefusal<T>(body: () => Promise<T>): Promise<T> {
  try {
    return await body();
  } catch (e) {
    if (e instanceof NotFoundError) throw new InputError(e.message);
    throw e;
  }
}

export async function run(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, OPTIONS);
    const [sub, arg] = positionals;
    if (values.help || !sub) {
      process.stdout.write(USAGE());
      return values.help ? 0 : 2;
    }
    const units = unitsFrom(values.units);
    // an option the command would ignore is refused, naming it
    const ignored = (name: string, why: string) => {
      throw new InputError(`--${name} ${why}; leave it out`, { field: name });
    };
    if (sub === 'verify') {
      if (values.units !== undefined)
        ignored('units', 'has no effect on verify (a PDF names its own units)');
      if (values['as-of'] !== undefined) ignored('as-of', 'has no effect on verify');
      if (values.out !== undefined) ignored('out', 'has no effect on verify');
      if (!arg) throw new InputError('name the report file to verify');
      const file = readInputFile(arg);
      return withStore((store) =>
        notFoundAsRefusal(async () => {
          const v = await verifyReport(store, Buffer.from(file.bytes), file.fileName);
          process.stdout.write(
            `${v.kind} report ${v.reportId}: ${v.ok ? 'MATCHES the records' : 'DOES NOT MATCH the records'}\n`,
          );
          for (const c of v.checks) {
            process.stdout.write(`  ${c.ok ? 'ok  ' : 'FAIL'} ${c.name}: ${c.detail}\n`);
            for (const d of (c.ok ? [] : (c.differences ?? [])).slice(0, 10)) {
              process.stdout.write(
                `         ${d.path}: file ${JSON.stringify(d.inFile)} / records ${JSON.stringify(d.inRecords)}\n`,
              );
            }
          }
          return v.ok ? 0 : 1;
        }),
      );
    }
    if (sub !== 'fit' && sub !== 'outlet')
      throw new InputError(`unknown report "${sub}" (fit, outlet or verify)`);
    if (sub === 'fit') idArg(arg, sub);
    else if (!arg) throw new InputError('name the outlet: its id or tag');
    if (values.json && values.units !== undefined)
      ignored('units', 'has no effect with --json (JSON reports are in SI)');
    if (sub === 'fit' && values['as-of'] !== undefined)
      ignored('as-of', "is for outlet reports (a fit's report has no as-of date)");
    if (!values.out) throw new InputError('say where to write the report: --out FILE');
    const out = values.out;
    return withStore((store) =>
      notFoundAsRefusal(async () => {
        const id = sub === 'fit' ? idArg(arg, sub) : (await outletByName(store, arg!)).outletId;
        const software = currentSoftware();
        const t0 = performance.now();
        const report =
          sub === 'fit'
            ? await fitReport(store, id, software)
            : await outletReport(store, id, software, values['as-of']);
        const bytes = values.json
          ? Buffer.from(reportJson(report as unknown as Record<string, unknown>))
          : sub === 'fit'
            ? await renderFitReportPdf(report as never, units)
            : await renderOutletReportPdf(report as never, units);
        writeFileSync(out, bytes);
        process.stdout.write(
          `${basename(out)}: ${sub} report ${report.reportId}, ${bytes.length} bytes, ${Math.round(performance.now() - t0)} ms\n`,
        );
        return 0;
      }),
    );
  });
}
