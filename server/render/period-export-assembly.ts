/**
 * The last step of a period export (period-export.ts): the files' SHA-256 hashes, manifest.json,
 * SHA256SUMS and the zip. Pure and separate so the service runs it in a task thread (hashing and
 * zipping tens of megabytes of PDFs), and the CLI in process.
 */
import { createHash } from 'node:crypto';
import type { SoftwareRecord } from '../core/report/index.js';
import { writeZip, type ZipEntry } from './zip.js';

export interface ExportAssembly {
  /** The reports, summary.csv and audit-excerpt.jsonl, in archive order. */
  entries: ZipEntry[];
  selection: Record<string, unknown>;
  software: SoftwareRecord;
  fits: number;
  /** ISO time of the latest approval: the zip's timestamps and the manifest's. */
  latestApproval: string;
}

export interface ExportFile {
  name: string;
  size: number;
  sha256: string;
}

/** The zip's bytes; its file list (name, size, SHA-256) is in its manifest and returned by exportFiles. */
export function assembleExport(a: ExportAssembly): Uint8Array {
  const enc = new TextEncoder();
  const files = exportFiles(a.entries);
  const manifest = {
    format: 'efflux-period-export',
    version: 1,
    selection: a.selection,
    software: a.software,
    fits: a.fits,
    latestApproval: a.latestApproval,
    note: 'The audit excerpt keeps each entry whole with its chain hashes; check the full chain with `efflux audit verify`, and each report with `efflux report verify`.',
    files,
  };
  const all: ZipEntry[] = [
    ...a.entries,
    { name: 'manifest.json', bytes: enc.encode(JSON.stringify(manifest, null, 2) + '\n') },
    {
      name: 'SHA256SUMS',
      bytes: enc.encode(files.map((f) => `${f.sha256}  ${f.name}`).join('\n') + '\n'),
    },
  ];
  return writeZip(all, a.latestApproval);
}

export function exportFiles(entries: ZipEntry[]): ExportFile[] {
  return entries.map((e) => ({
    name: e.name,
    size: e.bytes.length,
    sha256: createHash('sha256').update(e.bytes).digest('hex'),
  }));
}
