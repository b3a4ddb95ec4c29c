import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readZip, writeZip } from '../../server/render/zip.js';

// Info-ZIP's unzip (Debian package unzip): in CI (CI=true) a missing unzip fails the check; elsewhere it is skipped loudly.
const hasUnzip = spawnSync('unzip', ['-v']).status === 0;
const inCi = process.env.CI === 'true';
if (!hasUnzip && !inCi)
  console.warn(
    'SKIPPING unzip -t check: unzip is not installed — apt-get install -y unzip; in CI this fails',
  );

describe('writeZip', () => {
  const entries = [
    { name: 'a.txt', bytes: new TextEncoder().encode('hello\n') },
    { name: 'dir/b.bin', bytes: new Uint8Array(1000).map((_, i) => i & 0xff) },
    { name: 'ü-name.csv', bytes: new TextEncoder().encode('x,y\r\n1,2\r\n') },
  ];

  it('reads back (fflate) with the same names and bytes, and gives the same bytes again', () => {
    const zip = writeZip(entries, '2026-04-01T09:00:05Z');
    const back = readZip(zip);
    expect(back.map((e) => e.name)).toEqual(entries.map((e) => e.name));
    back.forEach((e, i) => {
      expect(Buffer.compare(e.bytes, Buffer.from(entries[i].bytes))).toBe(0);
    });
    expect(writeZip(entries, '2026-04-01T09:00:05Z').equals(zip)).toBe(true);
  });

  it.skipIf(!hasUnzip && !inCi)('passes unzip -t (Info-ZIP)', () => {
    if (!hasUnzip)
      expect.fail('unzip missing in CI: .ci/run should install it (apt-get install -y unzip)');
    const dir = mkdtempSync(join(tmpdir(), 'efflux-zip-'));
    const file = join(dir, 't.zip');
    writeFileSync(file, writeZip(entries, '2026-04-01T09:00:05Z'));
    const r = spawnSync('unzip', ['-t', file], { encoding: 'utf8' });
    expect(r.status, r.stdout + r.stderr).toBe(0);
    expect(r.stdout).toMatch(/No errors detected/);
    // the stated time survives, whatever the machine's time zone (Info-ZIP's listing)
    const list = spawnSync('unzip', ['-l', file], { encoding: 'utf8' });
    expect(list.stdout).toMatch(/2026-04-01 09:00|04-01-2026 09:00/);
  });
});
