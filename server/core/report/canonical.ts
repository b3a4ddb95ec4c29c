/**
 * Hand-written: the stored hashes depend on these exact rules, which no package promises to keep.
 *
 * Canonical JSON: object keys sorted by code unit, no whitespace, undefined members dropped,
 * non-finite numbers written as null, numbers as JSON.stringify writes them (shortest round-trip
 * form). The same value gives the same text on every run, so a hash over it can be recomputed.
 * The store's audit chain and result hashes use this same function (server/store/canonical-json.ts
 * re-exports it): changing these rules changes every stored hash, so old chains would not verify.
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) return 'null';
    const s = JSON.stringify(value);
    return s === undefined ? 'null' : s;
  }
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined && typeof obj[k] !== 'function')
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
}

/** The value as it reads back from its canonical text (NaN → null, undefined dropped). */
export function normalised<T>(value: T): T {
  return JSON.parse(canonicalJson(value)) as T;
}
