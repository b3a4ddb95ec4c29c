/**
 * Every action code the server writes into the audit log has a label in plain words
 * (server/core/audit/action-labels.ts): the codes are found in the source, so a new action with no
 * label fails here.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  ACTION_LABELS,
  actionGroups,
  actionLabel,
} from '../../../server/core/audit/action-labels.js';

const serverDir = fileURLToPath(new URL('../../../server/', import.meta.url));

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? sources(p) : p.endsWith('.ts') ? [p] : [];
  });
}

describe('audit action labels', () => {
  it('label every action the server writes', () => {
    const written = new Set<string>();
    for (const file of sources(serverDir)) {
      const text = readFileSync(file, 'utf8');
      for (const m of text.matchAll(/action:\s*'([a-z-]+\.[a-z-]+)'/g)) written.add(m[1]);
      // fit actions chosen in an expression or passed as an argument ('fit.create', 'fit.approve' …)
      for (const m of text.matchAll(
        /'((?:joint-)?fit\.(?:create|refit|approve|reject|supersede))'/g,
      ))
        written.add(m[1]);
    }
    expect(written.size).toBeGreaterThan(15);
    const missing = [...written].filter((a) => !(a in ACTION_LABELS));
    expect(missing).toEqual([]);
  });

  it('write the request of the issue in plain words, and any unknown code from its words', () => {
    expect(actionLabel('token.create')).toBe('API token created');
    expect(actionLabel('fit.approve')).toBe('Fit approved');
    expect(actionLabel('pump.start-up')).toBe('Pump start up');
    for (const label of Object.values(ACTION_LABELS)) expect(label).not.toMatch(/\.[a-z]/);
  });

  it('groups every labelled action once for the filter', () => {
    const listed = actionGroups().flatMap((g) => g.actions.map((a) => a.action));
    expect(listed.sort()).toEqual(Object.keys(ACTION_LABELS).sort());
  });
});
