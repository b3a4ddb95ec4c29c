import { createHash } from 'node:crypto';

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
 * Watches for commits by other connections or instances (the CLI writing a token, a script, a
 * second service on the same PostgreSQL database). The engine gives the number: on SQLite
 * `PRAGMA data_version`, which changes on this connection only when another one has committed
 * (about a microsecond, no transaction). A cache filled here stays right as long as the number
 * holds and this process's own writes drop what they change.
 */
export class ForeignWrites {
  constructor(private readonly source: () => number | Promise<number>) {}
  async version(): Promise<number> {
    return this.source();
  }
}

/**
 * A least-recently-used map of ready answers, bounded by their total size, emptied whole when
 * another connection has written (see ForeignWrites). Holds nothing that cannot be read again.
 *
 * Reads and writes interleave across awaits, so a value read before a write committed could be
 * put back after the write dropped it: every delete() and clear() moves `generation` on, and a
 * value loaded under an older generation is not kept (read() does this; set() takes the
 * generation seen before loading). Repositories drop what they change after the commit too, so
 * a reader that loaded the old row while the write was open (PostgreSQL does not make it wait)
 * cannot keep it.
 */
export class ReadCache<V> {
  private readonly map = new Map<string | number, { value: V; size: number }>();
  private bytes = 0;
  private seen: number | null = null;
  private gen = 0;

  constructor(
    private readonly foreign: ForeignWrites,
    private readonly maxBytes: number,
    private readonly sizeOf: (v: V) => number,
  ) {}

  /** Moves on with every delete() and clear(); pass the value seen before loading to set(). */
  get generation(): number {
    return this.gen;
  }

  /** False (and the cache emptied) when another connection has committed since the last look. */
  private async current(): Promise<boolean> {
    const v = await this.foreign.version();
    if (this.seen === null) this.seen = v; // the first look
    if (v === this.seen) return true;
    this.clear();
    this.seen = v;
    return false;
  }

  async get(key: string | number): Promise<V | undefined> {
    if (!(await this.current())) return undefined;
    const hit = this.map.get(key);
    if (!hit) return undefined;
    this.map.delete(key); // re-insert: Map order is the recency order
    this.map.set(key, hit);
    return hit.value;
  }

  /** The cached value, else load() kept when nothing changed while it ran. */
  async read(key: string | number, load: () => Promise<V>): Promise<V> {
    const hit = await this.get(key);
    if (hit !== undefined) return hit;
    const since = this.gen;
    const value = await load();
    await this.set(key, value, since);
    return value;
  }

  /**
   * Call after a get() that missed, with the generation seen before loading; a foreign commit or
   * an own write since then may have made `value` old: not kept.
   */
  async set(key: string | number, value: V, since = this.gen): Promise<void> {
    if (!(await this.current()) || since !== this.gen) return;
    const size = this.sizeOf(value);
    if (size > this.maxBytes) return;
    this.remove(key); // an older value of this key: no generation step, nothing new was written
    this.map.set(key, { value, size });
    this.bytes += size;
    for (const [k, old] of this.map) {
      if (this.bytes <= this.maxBytes) break;
      this.map.delete(k);
      this.bytes -= old.size;
    }
  }

  delete(key: string | number): void {
    this.gen++;
    this.remove(key);
  }

  private remove(key: string | number): void {
    const old = this.map.get(key);
    if (!old) return;
    this.map.delete(key);
    this.bytes -= old.size;
  }

  clear(): void {
    this.gen++;
    this.map.clear();
    this.bytes = 0;
  }

  get size(): number {
    return this.map.size;
  }
}
