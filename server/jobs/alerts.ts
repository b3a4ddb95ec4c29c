/**
 * Status-change notices to webhook addresses (EFFLUX_WEBHOOKS): a small in-process queue that
 * POSTs each notice as JSON to every address, off the request that caused it. Each delivery is
 * tried up to `attempts` times, waiting baseDelayMs·2^k (k = 0, 1, …) between tries, each try cut
 * off after timeoutMs; a delivery that still fails is logged and dropped (the status change itself
 * is already in the database and the audit log, so nothing is lost but the nudge).
 */

export interface StatusNotice {
  type: 'efflux.outlet.status-change';
  /** The status change's id (outlet_status_changes). */
  id: number;
  at: string;
  outlet: { id: number; key: string; vesselId: number; vesselName: string; site: string };
  fitId: number | null;
  from: string | null;
  to: string;
  reason: string;
  daysToThreshold: number | null;
  crossingAt: string | null;
}

export interface NotifierOptions {
  urls: readonly string[];
  /** Tries per address (default 5). */
  attempts?: number;
  /** First wait between tries (default 1 s); doubles each time. */
  baseDelayMs?: number;
  /** Per-try deadline (default 10 s). */
  timeoutMs?: number;
  /** Deliveries waiting beyond this are dropped, oldest first (default 1000). */
  maxQueued?: number;
  log?: (line: string, detail?: Record<string, unknown>) => void;
}

export interface Notifier {
  /** Queues a notice for every address; returns at once. */
  notify(notice: StatusNotice): void;
  /** Resolves when every queued delivery has finished (delivered or given up). */
  idle(): Promise<void>;
  /** Stops taking notices, waits for those in flight (at most graceMs), then drops the rest. */
  close(graceMs?: number): Promise<void>;
  readonly urls: readonly string[];
}

/** Addresses from a comma-separated list; refuses anything but http(s) URLs. */
export function parseWebhookList(text: string | undefined): string[] {
  if (!text) return [];
  const out: string[] = [];
  for (const part of text
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean)) {
    let u: URL;
    try {
      u = new URL(part);
    } catch {
      throw new Error(`EFFLUX_WEBHOOKS: "${part}" is not a URL`);
    }
    if (u.protocol !== 'http:' && u.protocol !== 'https:')
      throw new Error(`EFFLUX_WEBHOOKS: "${part}" is not an http(s) URL`);
    out.push(u.toString());
  }
  return out;
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms).unref());

export const NO_NOTIFIER: Notifier = {
  notify: () => {},
  idle: async () => {},
  close: async () => {},
  urls: [],
};

export function createNotifier(o: NotifierOptions): Notifier {
  if (o.urls.length === 0) return NO_NOTIFIER;
  const attempts = o.attempts ?? 5;
  const baseDelay = o.baseDelayMs ?? 1000;
  const timeoutMs = o.timeoutMs ?? 10_000;
  const maxQueued = o.maxQueued ?? 1000;
  const log = o.log ?? ((line) => process.stderr.write(`${line}\n`));
  const queue: { url: string; body: string; id: number }[] = [];
  const inFlight = new Set<Promise<void>>();
  let closed = false;
  let idleWaiters: (() => void)[] = [];
  const controllers = new Set<AbortController>();

  async function deliver(url: string, body: string, id: number): Promise<void> {
    for (let k = 0; k < attempts && !closed; k++) {
      if (k > 0) await sleep(baseDelay * 2 ** (k - 1));
      if (closed) break;
      const ac = new AbortController();
      controllers.add(ac);
      const timer = setTimeout(() => ac.abort(), timeoutMs);
      try {
        const res = await fetch(url, {
          method: 'POST',
          headers: { 'content-type': 'application/json' },
          body,
          signal: ac.signal,
        });
        await res.arrayBuffer().catch(() => undefined); // let the connection be reused
        if (res.ok) return;
        log(`webhook ${url}: notice ${id} answered ${res.status} (try ${k + 1} of ${attempts})`);
      } catch (e) {
        log(
          `webhook ${url}: notice ${id} failed: ${(e as Error).name === 'AbortError' ? `no answer within ${timeoutMs} ms` : (e as Error).message} (try ${k + 1} of ${attempts})`,
        );
      } finally {
        clearTimeout(timer);
        controllers.delete(ac);
      }
    }
    log(`webhook ${url}: gave up on notice ${id}`, { url, id });
  }

  // One delivery per address at a time keeps the order of notices to each receiver.
  const busy = new Set<string>();
  function pump(): void {
    for (let i = 0; i < queue.length; i++) {
      const job = queue[i];
      if (busy.has(job.url)) continue;
      queue.splice(i--, 1);
      busy.add(job.url);
      const p = deliver(job.url, job.body, job.id).finally(() => {
        busy.delete(job.url);
        inFlight.delete(p);
        pump();
        if (inFlight.size === 0 && queue.length === 0) {
          const w = idleWaiters;
          idleWaiters = [];
          for (const f of w) f();
        }
      });
      inFlight.add(p);
    }
  }

  return {
    urls: o.urls,
    notify(notice) {
      if (closed) return;
      const body = JSON.stringify(notice);
      for (const url of o.urls) queue.push({ url, body, id: notice.id });
      while (queue.length > maxQueued) {
        const dropped = queue.shift()!;
        log(`webhook ${dropped.url}: queue full, dropped notice ${dropped.id}`);
      }
      setImmediate(pump); // never inside the caller's turn of the event loop
    },
    idle() {
      if (inFlight.size === 0 && queue.length === 0) return Promise.resolve();
      return new Promise<void>((r) => idleWaiters.push(r));
    },
    async close(graceMs = 5000) {
      closed = true;
      queue.length = 0;
      await Promise.race([Promise.allSettled([...inFlight]), sleep(graceMs)]);
      for (const ac of controllers) ac.abort();
      await Promise.allSettled([...inFlight]);
    },
  };
}
