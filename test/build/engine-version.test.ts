/**
 * The engine version names exactly what computed a fit: package.json's version plus a hash of
 * server/core's sources (scripts/engine-version.mjs writes it at build time; core reads no files).
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
// @ts-expect-error plain ESM build script without type declarations
import { coreSourcesSha256 } from '../../scripts/engine-version.mjs';
import { ENGINE_VERSION, PACKAGE_VERSION } from '../../server/core/version.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const copy = mkdtempSync(join(tmpdir(), 'efflux-core-hash-'));
cpSync(join(root, 'server/core'), copy, { recursive: true });
afterAll(() => rmSync(copy, { recursive: true, force: true }));

describe('engine version', () => {
  it('is package.json version plus the hash of the current core sources', () => {
    expect(PACKAGE_VERSION).toBe(pkg.version);
    expect(ENGINE_VERSION).toMatch(/^\d+\.\d+\.\d+(-[\w.]+)?\+core\.[0-9a-f]{12}$/);
    expect(ENGINE_VERSION).toBe(
      `${pkg.version}+core.${coreSourcesSha256(join(root, 'server/core')).slice(0, 12)}`,
    );
  });

  it('changes when any core source changes, and not for line endings or the generated module', () => {
    const before = coreSourcesSha256(copy);
    expect(coreSourcesSha256(copy)).toBe(before); // deterministic
    const file = join(copy, 'drain/closed-form.ts');
    const text = readFileSync(file, 'utf8');
    writeFileSync(file, text.replace(/\n/g, '\r\n'));
    expect(coreSourcesSha256(copy)).toBe(before);
    writeFileSync(join(copy, 'engine-build.generated.ts'), '// other build\n');
    expect(coreSourcesSha256(copy)).toBe(before);
    writeFileSync(file, text.replace('0.5', '0.50001'));
    expect(text).toContain('0.5');
    expect(coreSourcesSha256(copy)).not.toBe(before);
    writeFileSync(file, text);
    writeFileSync(join(copy, 'fit/new-term.ts'), 'export const x = 1;\n');
    expect(coreSourcesSha256(copy)).not.toBe(before);
  });
});
