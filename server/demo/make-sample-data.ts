/**
 * Writes sample-data/: the invented Kestrel Fen scenario's vessel files, logger files in several
 * layouts, a manifest for the service's demo loader, and the truth each log was made with.
 * Deterministic (seeded): running it again gives identical files.
 * Run: npm run build && node dist/server/demo/make-sample-data.js [folder]
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildSampleData } from './build.js';

const here = dirname(fileURLToPath(import.meta.url));
const root = resolve(here, here.includes(`${'dist'}`) ? '../../..' : '../..');
const out = resolve(process.argv[2] ?? join(root, 'sample-data'));
mkdirSync(out, { recursive: true });
const files = buildSampleData();
for (const [name, bytes] of Object.entries(files)) {
  mkdirSync(dirname(join(out, name)), { recursive: true });
  writeFileSync(join(out, name), bytes);
  process.stdout.write(`wrote ${name} (${bytes.length} bytes)\n`);
}
