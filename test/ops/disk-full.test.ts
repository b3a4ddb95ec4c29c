/**
 * A full disk, for real: the data folder is a small tmpfs mounted for this file (the tests run as
 * root here; without the right to mount, this file fails loudly rather than skip). Uploads against
 * a full disk answer 507 problem+json; the database afterwards passes `integrity_check` and its
 * audit chain, and holds no partial record: either nothing of the upload, or (when the disk fills
 * between the bytes and the fit) no test at all after the compensating withdrawal.
 */
import { execFileSync } from 'node:child_process';
import { closeSync, mkdirSync, mkdtempSync, openSync, rmSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalysisRequest } from '../../server/core/analysis-contract.js';
import { buildApp } from '../../server/http/app.js';
import { SYSTEM_ACTOR, type Store } from '../../server/store/index.js';
import { checkDatabase, rowCounts } from '../../server/store/maintenance.js';
import { analyzeDrainTest } from '../http/fake-analyze.js';
import { multipart, VESSEL_FILE } from '../http/helpers.js';
import { openTestStore } from '../support/store.js';

const mountPoint = mkdtempSync(join(tmpdir(), 'efflux-full-'));
const dataDir = join(mountPoint, 'data');
const filler = join(mountPoint, 'filler');

/** Writes zeros until the file system refuses (ENOSPC); returns the bytes written. */
function fillDisk(): number {
  const fd = openSync(filler, 'a');
  const chunk = Buffer.alloc(4096);
  let n = 0;
  try {
    for (;;) n += writeSync(fd, chunk);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ENOSPC') throw e;
  } finally {
    closeSync(fd);
  }
  return n;
}
const freeDisk = () => rmSync(filler, { force: true });

beforeAll(() => {
  // 8 MiB: room for the database and a few uploads, small enough to fill in a moment
  execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=8m', 'tmpfs', mountPoint]);
  mkdirSync(dataDir);
});
afterAll(() => {
  try {
    execFileSync('umount', ['-l', mountPoint]);
  } finally {
    rmSync(mountPoint, { recursive: true, force: true });
  }
});

const log = (i: number) =>
  Buffer.from(`t,level\n0,2.0\n1,1.9\n2,1.${i}\n` + '3,1.7\n'.repeat(30_000)); // ~180 kB

describe('a full disk', () => {
  let store: Store;
  let fillDuringAnalysis = false;
  const analyze = async (req: AnalysisRequest) => {
    const out = analyzeDrainTest(req);
    if (fillDuringAnalysis) fillDisk(); // another writer fills the disk between the bytes and the fit
    return out;
  };

  it('answers 507 problem+json and keeps nothing; after space is freed the next upload is whole', async () => {
    store = await openTestStore({ dataDir });
    const token = (await store.users.createToken(SYSTEM_ACTOR, 'tech', 'admin')).token;
    const app = await buildApp({ store, analyze });
    const auth = { authorization: `Bearer ${token}` };
    const v = await app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: auth,
      payload: VESSEL_FILE,
    });
    const vesselId = v.json().id;
    const up = (i: number) => {
      const m = multipart([{ field: 'log', name: `run-${i}.csv`, bytes: log(i) }]);
      return app.inject({
        method: 'POST',
        url: `/api/vessels/${vesselId}/tests`,
        headers: { ...auth, ...m.headers },
        payload: m.payload,
      });
    };
    expect((await up(0)).statusCode).toBe(201);
    const before = await rowCounts(store.sql);

    // 1. the disk is full before the upload: the bytes cannot be stored
    expect(fillDisk()).toBeGreaterThan(0);
    const full = await up(1);
    expect(full.statusCode).toBe(507);
    expect(full.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(full.json()).toMatchObject({ status: 507, type: 'urn:efflux:problem:disk-full' });
    expect(full.body).not.toMatch(/SQLITE|at .*\.ts/);
    expect(await rowCounts(store.sql)).toEqual(before);
    freeDisk();

    // 2. the disk fills while the analysis runs: the bytes were stored, the fit cannot be
    fillDuringAnalysis = true;
    const mid = await up(2);
    fillDuringAnalysis = false;
    expect(mid.statusCode).toBe(507);
    freeDisk();
    const after = await rowCounts(store.sql);
    // the compensating step withdrew the test: no test, raw file or fit beyond what was there,
    // and the audit log tells the upload and its withdrawal (two entries more)
    expect({ ...after, audit_log: 0 }).toEqual({ ...before, audit_log: 0 });
    expect(after.audit_log).toBe(before.audit_log + 2);
    expect(await store.tests.pending()).toEqual([]);
    expect(await checkDatabase(store.sql)).toMatchObject({ ok: true, problems: [] });

    // 3. with space again, an upload is stored with its fit
    const ok = await up(3);
    expect(ok.statusCode).toBe(201);
    expect((await rowCounts(store.sql)).fits).toBe(before.fits + 1);
    expect((await checkDatabase(store.sql)).ok).toBe(true);
    await app.close();
    await store.close();
  });
});
