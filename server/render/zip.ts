import { unzipSync, zipSync, type Zippable } from 'fflate';

/**
 * Zip archives through fflate: stored entries (no compression; the PDFs inside are compressed
 * already), one fixed modification time for every entry so the same files give the same bytes.
 */
export interface ZipEntry {
  name: string;
  bytes: Uint8Array;
}

/**
 * fflate writes the DOS time from a Date's local-time fields; give it the local date whose fields
 * are the UTC fields of modifiedIso, so the bytes do not depend on the machine's time zone.
 */
function entryTime(iso: string): Date {
  const d = new Date(iso);
  if (!Number.isFinite(d.getTime()) || d.getUTCFullYear() < 1980) return new Date(1980, 0, 1);
  return new Date(
    d.getUTCFullYear(),
    d.getUTCMonth(),
    d.getUTCDate(),
    d.getUTCHours(),
    d.getUTCMinutes(),
    d.getUTCSeconds(),
  );
}

export function writeZip(entries: ZipEntry[], modifiedIso: string): Buffer {
  const mtime = entryTime(modifiedIso);
  const files: Zippable = {};
  for (const e of entries) {
    if (e.name in files) throw new Error(`duplicate zip entry ${e.name}`);
    files[e.name] = [e.bytes, { level: 0, mtime }];
  }
  // fflate lists entries in the object's key order, which puts integer-like names first
  const names = Object.keys(files);
  if (names.some((n, i) => n !== entries[i].name))
    throw new Error('zip entry names must not be bare integers');
  const out = zipSync(files);
  return Buffer.from(out.buffer, out.byteOffset, out.byteLength);
}

/** Reads an archive back (for checks and tests), entries in their stored order. */
export function readZip(buf: Uint8Array): { name: string; bytes: Buffer }[] {
  return Object.entries(unzipSync(buf)).map(([name, bytes]) => ({
    name,
    bytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength),
  }));
}
