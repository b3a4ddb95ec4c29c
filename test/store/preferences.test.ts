import { describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import { openTestStore } from '../support/store.js';

describe('display preferences (migration 006)', () => {
  it('SI until chosen; a choice is kept per person; the table refuses anything but si and us', async () => {
    const store = await openTestStore({ now: () => '2026-12-05T08:00:00.000Z' });
    try {
      const a = (await store.users.createToken(SYSTEM_ACTOR, 'A. Fenwick (fictional)', 'engineer'))
        .user;
      const b = (
        await store.users.createToken(SYSTEM_ACTOR, 'B. Reedling (fictional)', 'technician')
      ).user;
      expect(await store.preferences.get(a.id)).toEqual({ displayUnits: 'si' });
      await store.preferences.setDisplayUnits(a.id, 'us');
      expect(await store.preferences.get(a.id)).toEqual({ displayUnits: 'us' });
      expect(await store.preferences.get(b.id)).toEqual({ displayUnits: 'si' });
      await store.preferences.setDisplayUnits(a.id, 'si');
      expect(await store.preferences.get(a.id)).toEqual({ displayUnits: 'si' });
      expect(
        await store.sql.value('SELECT count(*) FROM user_preferences WHERE user_id = ?', [a.id]),
      ).toBe(1);
      await expect(
        store.sql.run(
          "INSERT INTO user_preferences (user_id, display_units, updated_at) VALUES (?, 'furlong', 'x')",
          [b.id],
        ),
      ).rejects.toThrow(/check constraint/i);
    } finally {
      await store.close();
    }
  });
});
