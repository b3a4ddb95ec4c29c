/**
 * Who analyses a pending test. An upload's analysis runs after its bytes are committed, and an
 * instance that starts resumes the tests left pending; with several instances on one PostgreSQL
 * database, both may find the same test. A claim makes one of them the analyst: the others skip
 * it (a resume) or wait for it (the upload that stored it, whose answer is then that analysis).
 *
 * PostgreSQL: a session advisory lock per test (`pg_try_advisory_lock`, the "skip locked" of
 * advisory locks), all of this instance's held on ONE connection of their own, not the pool's: an
 * analysis takes seconds, and neither a transaction nor a pooled connection is held across it
 * (50 uploads waiting for the analysis pool would otherwise hold 50 connections). A process that
 * dies closes that connection, and its claims end with it, so another instance's next resume
 * takes the tests over. SQLite: one process holds the data folder (folder-lock.ts), and the
 * in-process set in jobs/ingest.ts already keeps two analyses of one test apart, so a claim is
 * always granted.
 */
import type pg from 'pg';

export interface Claim {
  release(): Promise<void>;
}

export interface AnalysisClaims {
  /** The test for this process, or null when another instance is analysing it now. */
  tryClaim(testId: number): Promise<Claim | null>;
  /** Waits (polling every 100 ms) until this process has the test. */
  claim(testId: number): Promise<Claim>;
  close(): Promise<void>;
}

const granted: Claim = { release: async () => {} };

/** SQLite: one process per data folder. */
export class LocalClaims implements AnalysisClaims {
  async tryClaim(): Promise<Claim> {
    return granted;
  }
  async claim(): Promise<Claim> {
    return granted;
  }
  async close(): Promise<void> {}
}

const KEY = "hashtextextended('efflux.analysis.' || $1::text, 0)";
const POLL_MS = 100;

/** PostgreSQL: advisory locks on one connection of this instance's own. */
export class PostgresClaims implements AnalysisClaims {
  private client: Promise<pg.Client> | null = null;
  private closed = false;

  constructor(private readonly connect: () => Promise<pg.Client>) {}

  private conn(): Promise<pg.Client> {
    if (this.closed) return Promise.reject(new Error('the store is closed'));
    if (!this.client) {
      const c = this.connect().then((client) => {
        // the connection is gone: its claims went with it; the next claim opens another
        client.on('error', () => {
          if (this.client === c) this.client = null;
        });
        client.on('end', () => {
          if (this.client === c) this.client = null;
        });
        return client;
      });
      c.catch(() => {
        if (this.client === c) this.client = null;
      });
      this.client = c;
    }
    return this.client;
  }

  async tryClaim(testId: number): Promise<Claim | null> {
    const client = await this.conn();
    const r = await client.query<{ got: boolean }>(`SELECT pg_try_advisory_lock(${KEY}) AS got`, [
      testId,
    ]);
    if (!r.rows[0].got) return null;
    let released = false;
    return {
      release: async () => {
        if (released) return;
        released = true;
        // a connection lost since has released it already
        await client.query(`SELECT pg_advisory_unlock(${KEY})`, [testId]).catch(() => {});
      },
    };
  }

  async claim(testId: number): Promise<Claim> {
    for (;;) {
      const c = await this.tryClaim(testId);
      if (c) return c;
      await new Promise((r) => setTimeout(r, POLL_MS));
    }
  }

  async close(): Promise<void> {
    this.closed = true;
    const c = this.client;
    this.client = null;
    if (c) await (await c.catch(() => null))?.end().catch(() => {});
  }
}
