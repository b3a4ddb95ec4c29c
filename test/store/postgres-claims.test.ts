// Claims of pending tests between two instances on one PostgreSQL database (vitest project `postgres`).
import { describe, expect, it } from 'vitest';
import { openTestStorePair } from '../support/store.js';

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
});
