/**
 * A data folder with the invented demo's backwash tank (sample-data/, fictional): one drain test
 * uploaded through the service's own path, fitted, approved by an engineer; a clock that ticks one
 * second per call so every stored time is fixed.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { checkVesselFile } from '../../server/http/vessel-file.js';
import { uploadDrainTest } from '../../server/jobs/ingest.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { actorOf } from '../../server/store/users.js';
import { openTestStore } from '../support/store.js';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const sample = (name: string) => join(root, 'sample-data', name);

export interface Fixture {
  dataDir: string;
  store: Store;
  fitId: number;
  outletId: number;
  vesselId: number;
  logSha256: string;
}

export const SOFTWARE = {
  name: 'efflux',
  version: 'test',
  gitCommit: '0123456789abcdef0123456789abcdef01234567',
};

export async function reportFixture(
  tests: {
    log: string;
    testedAt: string;
    operator?: string;
    loggerId?: string;
    notes?: string;
  }[] = [{ log: 'fb1-2026-03-10-preamble.csv', testedAt: '2026-03-10T08:15:00Z' }],
): Promise<Fixture & { fitIds: number[] }> {
  const dataDir = mkdtempSync(join(tmpdir(), 'efflux-report-'));
  let t = Date.parse('2026-04-01T09:00:00Z');
  const store = await openTestStore({ dataDir, now: () => new Date((t += 1000)).toISOString() });
  const engineer = (
    await store.users.createToken(SYSTEM_ACTOR, 'R. Penhallow (fictional)', 'engineer')
  ).user;
  // four eyes: a technician uploads, the engineer approves
  const technician = (
    await store.users.createToken(SYSTEM_ACTOR, 'T. Ashdown (fictional)', 'technician')
  ).user;
  const spec = checkVesselFile(
    JSON.parse(readFileSync(sample('backwash-tank-fb1.vessel.json'), 'utf8')),
    'backwash-tank-fb1.vessel.json',
  );
  const vessel = await store.vessels.create(SYSTEM_ACTOR, spec);
  const fitIds: number[] = [];
  let logSha256 = '';
  for (const test of tests) {
    const { fit, test: stored } = await uploadDrainTest(
      store,
      async (req) => analyzeDrainTest(req),
      actorOf(technician),
      {
        vesselId: vessel.id,
        log: { bytes: readFileSync(sample(test.log)), fileName: test.log },
        settings: {},
        operator: test.operator ?? 'T. Ashdown (fictional)',
        loggerId: test.loggerId ?? 'KF-LG-01',
        testedAt: test.testedAt,
        notes: test.notes ?? 'Routine test (invented demo data).',
      },
    );
    await store.fits.review(
      actorOf(engineer),
      fit.id,
      'approved',
      'Window and fit checked; Cd within the usual band.',
    );
    fitIds.push(fit.id);
    logSha256 ||= stored.sha256;
  }
  return {
    dataDir,
    store,
    fitId: fitIds[0],
    fitIds,
    outletId: vessel.outlets[0].id,
    vesselId: vessel.id,
    logSha256,
  };
}
