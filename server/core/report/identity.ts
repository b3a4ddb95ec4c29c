import { canonicalJson } from './canonical.js';

/** SHA-256 of a text as lower-case hex: injected by the shell (node:crypto), so core stays free
 * of node: imports. */
export type Sha256Hex = (text: string) => string;

/**
 * A report's identity: the SHA-256 of its canonical JSON with the identity fields left out, and
 * the report id = the first 16 hex digits of that hash. The same records give the same id.
 */
export function contentHash(body: Record<string, unknown>, sha256Hex: Sha256Hex): string {
  const { reportId: _id, contentSha256: _h, ...rest } = body;
  return sha256Hex(canonicalJson(rest));
}

export function reportIdOf(hash: string): string {
  return hash.slice(0, 16);
}

/** Fills in the identity fields and returns the object as it will read back from its JSON. */
export function withIdentity<T extends Record<string, unknown>>(
  body: T,
  sha256Hex: Sha256Hex,
): T & { reportId: string; contentSha256: string } {
  const normal = JSON.parse(canonicalJson(body)) as T;
  const hash = contentHash(normal, sha256Hex);
  return { ...normal, reportId: reportIdOf(hash), contentSha256: hash };
}

/** The JSON report: canonical JSON of the whole report, identity included, and a final newline. */
export function reportJson(report: Record<string, unknown>): string {
  return canonicalJson(report) + '\n';
}
