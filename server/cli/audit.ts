/** `efflux audit verify`: walks the hash chain; exit 0 when intact, 1 naming the entry that broke it. */
import { openStore } from '../store/index.js';
import { dataDir } from './serve-config.js';

export async function run(argv: string[]): Promise<number> {
  if (argv[0] !== 'verify') {
    process.stderr.write('usage: efflux audit verify   (checks the audit log in EFFLUX_DATA_DIR)\n');
    return 2;
  }
  const store = openStore({ dataDir: dataDir() });
  try {
    const r = store.audit.verify();
    if (r.ok) {
      process.stdout.write(`audit chain intact: ${r.count} entries; head ${r.head}\n`);
      return 0;
    }
    process.stdout.write(`audit chain BROKEN at entry ${r.brokenAt}: ${r.reason}\n(last good head ${r.head})\n`);
    return 1;
  } finally {
    store.close();
  }
}
