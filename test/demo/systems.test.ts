import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildSystemSampleData } from '../../server/demo/systems.js';
import { root } from '../cli/run-cli.js';

describe('sample-data/systems: the invented connected-vessel tests', () => {
  it('is exactly what server/demo/systems.ts writes (seeded, so regenerating changes nothing)', () => {
    const dir = join(root, 'sample-data/systems');
    const built = buildSystemSampleData();
    expect(
      readdirSync(dir)
        .filter((f) => f !== 'README.md')
        .sort(),
    ).toEqual(Object.keys(built).sort());
    for (const [name, text] of Object.entries(built))
      expect(readFileSync(join(dir, name), 'utf8')).toBe(text);
  });
});
