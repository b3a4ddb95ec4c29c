import { createHash } from 'node:crypto';

/** SHA-256 (FIPS 180-4) as lower-case hex, through node:crypto; the shells inject it into core. */
export function sha256Hex(input: Uint8Array | string): string {
  return createHash('sha256').update(input).digest('hex');
}
