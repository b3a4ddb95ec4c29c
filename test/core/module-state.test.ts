// Core keeps no module-level mutable state (issue 13): no top-level `let`/`var`, so a result
// never depends on an earlier call. Module constants (`const`) are allowed.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const coreDir = join(import.meta.dirname, '../../server/core');

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? tsFiles(p) : p.endsWith('.ts') ? [p] : [];
  });
}

describe('server/core', () => {
  it('declares no top-level let or var', () => {
    const found: string[] = [];
    for (const file of tsFiles(coreDir)) {
      readFileSync(file, 'utf8')
        .split('\n')
        .forEach((line, i) => {
          if (/^(export\s+)?(let|var)\s/.test(line)) found.push(`${file}:${i + 1}: ${line.trim()}`);
        });
    }
    expect(found).toEqual([]);
  });

  it('finds the core files it checks', () => {
    expect(tsFiles(coreDir).length).toBeGreaterThan(50);
  });
});
