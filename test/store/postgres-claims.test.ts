// Claims of pending tests between two instances on one PostgreSQL database (vitest project `postgres`).
import { describe, expect, it } from 'vitest';
import type { AnalysisRequest } from '../../server/core/analysis-contract.js';
import { resumePending } from '../../server/jobs/ingest.js';
import { fakeAnalyze } from '../http/fake-analyze.js';
import { openTestStorePair } from '../support/store.js';
import { SYSTEM_ACTOR, VESSEL } from './helpers.js';

describe('analysis claims across instances', () => {
  it('one instance at a time; released, or its connection gone, the other may take it', async () => {
    const [a, b] = await openTestStorePair();
    try {
      const held = await a.claims.tryClaim(7);
      expect(held).not.toBeNull();
      expect(await b.claims.tryClaim(7)).toBeNull();
      const other = await b.claims.tryClaim(8); // another test is free
      expect(other).not.toBeNull();
      await other!.release();

      // b waits for 7 while a still analyses it
      let bHasIt = false;
      const waiting = b.claims.claim(7).then((c) => {
        bHasIt = true;
        return c;
      });
      await new Promise((r) => setTimeout(r, 300));
      expect(bHasIt).toBe(false);
      await held!.release();
      const taken = await waiting;
      expect(bHasIt).toBe(true);
      expect(await a.claims.tryClaim(7)).toBeNull();

      // a process that dies (here: its claims connection cut by the server) leaves its claims
      await taken.release();
      expect(await a.claims.tryClaim(9)).not.toBeNull();
      expect(await b.claims.tryClaim(9)).toBeNull();
      await b.sql.run(
        "SELECT pg_terminate_backend(pid) FROM pg_locks WHERE locktype = 'advisory' AND granted AND pid <> pg_backend_pid()",
      );
      let again = null;
      for (let i = 0; i < 50 && !again; i++) {
        again = await b.claims.tryClaim(9);
        if (!again) await new Promise((r) => setTimeout(r, 100));
      }
      expect(again).not.toBeNull();
    } finally {
      await a.close();
      await b.close();
    }
  });

  it('a resume leaves a test another instance is analysing (no failure noted), and takes it once that one is gone', async () => {
    const [a, b] = await openTestStorePair();
    try {
      const v = await a.vessels.create(SYSTEM_ACTOR, VESSEL);
      const t = await a.tests.createPending(SYSTEM_ACTOR, {
        vesselId: v.id,
        outletId: v.outlets[0].id,
        log: {
          bytes: new TextEncoder().encode('t,level\n0,2\n1,1.9\n2,1.8\n'),
          fileName: 'log.csv',
        },
        settings: {},
      });
      let analyses = 0;
      const analyze = async (req: AnalysisRequest) => {
        analyses++;
        return fakeAnalyze(req);
      };
      const held = await a.claims.tryClaim(t.id); // instance a is analysing it
      expect(await resumePending(b, analyze, SYSTEM_ACTOR)).toEqual({
        done: 0,
        refused: 0,
        failed: [],
        stuck: 0,
      });
      expect(analyses).toBe(0);
      expect((await b.tests.get(t.id)).failedAttempts).toBe(0);
      await held!.release(); // a stopped without storing a fit
      expect((await resumePending(b, analyze, SYSTEM_ACTOR)).done).toBe(1);
      expect(analyses).toBe(1);
      expect((await a.tests.get(t.id)).status).toBe('analysed');
      expect(await a.fits.listByTest(t.id)).toHaveLength(1);
      // a second resume (a's, say) finds nothing left: the test was analysed once
      expect((await resumePending(a, analyze, SYSTEM_ACTOR)).done).toBe(0);
      expect(analyses).toBe(1);
    } finally {
      await a.close();
      await b.close();
    }
  });
});
