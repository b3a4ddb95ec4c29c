import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../server/store/canonical-json.js';
import { memoryStore, SYSTEM_ACTOR, VESSEL } from './helpers.js';

describe('canonical JSON', async () => {
  it('sorts keys at every depth and drops undefined members', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 1, y: 2 }], c: undefined } })).toBe(
      '{"a":{"d":[1,{"y":2,"z":1}]},"b":1}',
    );
  });
});

describe('audit chain', async () => {
  async function storeWithHistory() {
    const s = await memoryStore();
    const v = await s.vessels.create(SYSTEM_ACTOR, VESSEL);
    await s.vessels.update(SYSTEM_ACTOR, v.id, { ...VESSEL, notes: 'second' });
    await s.users.createToken(SYSTEM_ACTOR, 'ana', 'engineer');
    return s;
  }

  it('links every entry to the one before and verifies', async () => {
    const s = await storeWithHistory();
    const entries = await s.audit.list();
    expect(entries.map((e) => e.action)).toEqual([
      'vessel.create',
      'vessel.update',
      'user.create',
      'token.create',
    ]);
    for (let i = 1; i < entries.length; i++) expect(entries[i].prevHash).toBe(entries[i - 1].hash);
    const report = await s.audit.verify();
    expect(report).toMatchObject({ ok: true, count: 4, head: entries[3].hash });
  });

  it('refuses UPDATE and DELETE through the triggers', async () => {
    const s = await storeWithHistory();
    await expect(s.sql.run(`UPDATE audit_log SET actor_name = 'x' WHERE seq = 2`)).rejects.toThrow(
      /append-only/,
    );
    await expect(s.sql.run('DELETE FROM audit_log WHERE seq = 2')).rejects.toThrow(/append-only/);
  });

  it('detects an edited entry (triggers dropped by someone with raw access) and names it', async () => {
    const s = await storeWithHistory();
    await s.sql.run('DROP TRIGGER audit_log_no_update');
    await s.sql.run(`UPDATE audit_log SET after = json_set(after, '$.name', 'T-9') WHERE seq = 2`);
    const r = await s.audit.verify();
    expect(r.ok).toBe(false);
    expect(r.brokenAt).toBe(2);
    expect(r.reason).toMatch(/changed/);
  });

  it('detects a deleted entry', async () => {
    const s = await storeWithHistory();
    await s.sql.run('DROP TRIGGER audit_log_no_delete');
    await s.sql.run('DELETE FROM audit_log WHERE seq = 2');
    const r = await s.audit.verify();
    expect(r).toMatchObject({ ok: false, brokenAt: 3 });
  });

  it('detects a re-hashed edit by the broken link to the next entry', async () => {
    const s = await storeWithHistory();
    await s.sql.run('DROP TRIGGER audit_log_no_update');
    await s.sql.run(`UPDATE audit_log SET hash = ? WHERE seq = 2`, ['f'.repeat(64)]);
    const r = await s.audit.verify();
    expect(r.ok).toBe(false);
    expect(r.brokenAt).toBe(2);
  });

  it('filters by entity and action', async () => {
    const s = await storeWithHistory();
    expect((await s.audit.list({ entityType: 'vessel' })).length).toBe(2);
    expect((await s.audit.list({ action: 'token.create' })).length).toBe(1);
    expect((await s.audit.list({ afterSeq: 3 })).map((e) => e.seq)).toEqual([4]);
  });
});
