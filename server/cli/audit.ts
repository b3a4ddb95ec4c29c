/**
 * `efflux audit verify`: walks the hash chain and checks every stored copy against its source
 * (result columns of fits, test dates, the outlet status cache: jobs/verify-records.ts); exit 0
 * when all hold, 1 naming the broken entry or each row and field that differs.
 */
import { verifyRecords } from '../jobs/verify-records.js';
import { openStore } from '../store/index.js';
import { storeLocation } from './serve-config.js';
import { countText } from '../core/format/words.js';

export async function run(argv: string[]): Promise<number> {
  if (argv[0] !== 'verify') {
    process.stderr.write(
      'usage: efflux audit verify   (checks the audit log and the stored copies in EFFLUX_DATA_DIR)\n',
    );
    return 2;
  }
  const store = await openStore(storeLocation());
  try {
    const r = await store.audit.verify();
    const records = await verifyRecords(store);
    const out: string[] = [];
    if (r.ok) out.push(`audit chain intact: ${r.count} entries; head ${r.head}`);
    else
      out.push(
        `audit chain BROKEN at entry ${r.brokenAt}: ${r.reason}`,
        `(last good head ${r.head})`,
      );
    if (records.ok)
      out.push(
        `stored copies agree: ${records.fitsChecked} fits, ${records.outletsChecked} cached outlet statuses`,
      );
    else {
      out.push(`stored copies DIFFER (${records.differences.length}):`);
      for (const d of records.differences) out.push(`  ${d.message}`);
    }
    if (records.undatedTests.length) {
      out.push(
        `note: ${countText(records.undatedTests.length, 'old test')} ${records.undatedTests.length === 1 ? 'has' : 'have'} no date and stay out of the trend:`,
      );
      for (const u of records.undatedTests) out.push(`  test ${u.testId}: ${u.reason}`);
    }
    process.stdout.write(out.join('\n') + '\n');
    return r.ok && records.ok ? 0 : 1;
  } finally {
    await store.close();
  }
}
