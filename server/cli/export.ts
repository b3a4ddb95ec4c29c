/**
 * `efflux export [--site S] [--vessel V] [--from DATE] [--to DATE] --out archive.zip`: every
 * approved fit chosen, as one zip of PDF reports, a CSV summary, the audit excerpt and a manifest
 * of SHA-256 hashes. Database in EFFLUX_DATA_DIR, as for efflux serve.
 */
import { writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import { InputError } from '../core/errors.js';
import { periodExport } from '../render/period-export.js';
import { currentSoftware } from '../render/software.js';
import { openStore } from '../store/index.js';
import { guarded } from './io.js';
import { sitesByPart, vesselByName } from './names.js';
import { parseCommandLine } from './options.js';
import { dataDir } from './serve-config.js';

const USAGE = `usage: efflux export [--site PART] [--vessel ID|TAG|NAME] [--from YYYY-MM-DD] [--to YYYY-MM-DD] --out archive.zip
All approved (current) fits whose drain test falls in the period; --to includes its whole day.
--site matches any part of a site's name, in any case, and says which sites it matched.
`;

const OPTIONS = {
  site: { type: 'string' },
  vessel: { type: 'string' },
  from: { type: 'string' },
  to: { type: 'string' },
  out: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

export async function run(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, OPTIONS);
    if (values.help) {
      process.stdout.write(USAGE);
      return 0;
    }
    if (positionals.length)
      throw new InputError(`unexpected argument "${positionals[0]}" (see --help)`);
    if (!values.out) throw new InputError('say where to write the archive: --out archive.zip');
    const store = await openStore({ dataDir: dataDir() });
    try {
      const t0 = performance.now();
      const sites =
        values.site === undefined
          ? undefined
          : await sitesByPart(store, values.site, (l) => process.stdout.write(`${l}\n`));
      const vessel =
        values.vessel === undefined
          ? undefined
          : String((await vesselByName(store, values.vessel)).vesselId);
      const r = await periodExport(
        store,
        { sites, vessel, from: values.from, to: values.to },
        currentSoftware(),
      );
      writeFileSync(values.out, r.zip);
      process.stdout.write(
        `${basename(values.out)}: ${r.fits} approved fits, ${r.fileCount} files, ${r.zip.length} bytes, ${Math.round(performance.now() - t0)} ms\n`,
      );
      return 0;
    } finally {
      await store.close();
    }
  });
}
