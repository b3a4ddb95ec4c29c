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
import { parseCommandLine } from './options.js';
import { dataDir } from './serve-config.js';

const USAGE = `usage: efflux export [--site S] [--vessel ID|NAME] [--from YYYY-MM-DD] [--to YYYY-MM-DD] --out archive.zip
All approved (current) fits whose drain test falls in the period; --to includes its whole day.
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
      const r = await periodExport(
        store,
        { site: values.site, vessel: values.vessel, from: values.from, to: values.to },
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
