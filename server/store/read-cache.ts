import { createHash } from 'node:crypto';
import type { Db } from './db.js';

/** JSON text as UTF-8 bytes ready to send, with a digest of them (the service's ETag). */
export interface ReadyText {
  body: Buffer;
  digest: string;
}

/** The digest is the first 128 bits of the SHA-256 in base64url: enough to tell versions apart. */
export function readyText(json: string): ReadyText {
  const body = Buffer.from(json);
  return {
    body,
    digest: createHash('sha256').update(body).digest().subarray(0, 16).toString('base64url'),
  };
}

/**
 * Watches for commits by other connections (the CLI writing a token, a script): SQLite's
 * `PRAGMA data_version` changes on this connection only when another one has committed, so a
 * cache filled from this connection stays right as long as the number holds and this process's
 * own writes drop what they change. Reading it costs about a microsecond.
 */
export class ForeignWrites {
  private readonly stmt;
  constructor(db: Db) {
    this.stmt = db.prepare('PRAGMA data_version').pluck();
  }
  version(): number {
    return this.stmt.get() as number;
  }
}

/**
 * A least-recently-used map of ready answers, bounded by their total size, emptied whole when
 * another connection has written (see ForeignWrites). Holds nothing that cannot be read again.
 */
export class ReadCache<V> {
  private readonly map = new Map<string | number, { value: V; size: number }>();
  private bytes = 0;
  private seen: number;

  constructor(
    private readonly foreign: ForeignWrites,
    private readonly maxBytes: number,
    private readonly sizeOf: (v: V) => number,
  ) {
    this.seen = foreign.version();
  }

  get(key: string | number): V | undefined {
    const v = this.foreign.version();
    if (v !== this.seen) {
      this.clear();
      this.seen = v;
      return undefined;
    }
    const hit = this.map.get(key);
    if (!hit) return undefined;
    this.map.delete(key); // re-insert: Map order is the recency order
    this.map.set(key, hit);
    return hit.value;
  }

  /** Call after a get() that missed; a foreign commit since then may have made `value` old: not kept. */
  set(key: string | number, value: V): void {
    const v = this.foreign.version();
    if (v !== this.seen) {
      this.clear();
      this.seen = v;
      return;
    }
    const size = this.sizeOf(value);
    if (size > this.maxBytes) return;
    this.delete(key);
    this.map.set(key, { value, size });
    this.bytes += size;
    for (const [k, old] of this.map) {
      if (this.bytes <= this.maxBytes) break;
      this.map.delete(k);
      this.bytes -= old.size;
    }
  }

  delete(key: string | number): void {
    const old = this.map.get(key);
    if (!old) return;
    this.map.delete(key);
    this.bytes -= old.size;
  }

  clear(): void {
    this.map.clear();
    this.bytes = 0;
  }

  get size(): number {
    return this.map.size;
  }
}
