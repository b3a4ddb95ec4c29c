import { describe, expect, it } from 'vitest';
import { openMemoryDatabase } from '../../server/store/db.js';
import { PAGE_ROWS, pagedRows } from '../../server/store/pages.js';
import { toNumberedPlaceholders } from '../../server/store/sql.js';
import { SqliteSql } from '../../server/store/sqlite-sql.js';

describe('toNumberedPlaceholders', () => {
  it('numbers ? in order and leaves quoted text alone', () => {
    expect(toNumberedPlaceholders("SELECT '?', a FROM t WHERE b = ? AND c = ?", [1, 'x'])).toEqual({
      text: "SELECT '?', a FROM t WHERE b = $1 AND c = $2",
      values: [1, 'x'],
    });
  });
  it('maps @names to numbers, a repeated name to the same number', () => {
    expect(
      toNumberedPlaceholders('UPDATE t SET a = @a, b = @b WHERE a <> @a', { b: 2, a: 1 }),
    ).toEqual({ text: 'UPDATE t SET a = $1, b = $2 WHERE a <> $1', values: [1, 2] });
    expect(() => toNumberedPlaceholders('SELECT @missing', {})).toThrow(/@missing/);
  });
});

describe('SqliteSql', () => {
  const open = async () => {
    const sql = new SqliteSql(openMemoryDatabase());
    await sql.run('CREATE TABLE t (id INTEGER PRIMARY KEY, v TEXT)');
    return sql;
  };

  it('reads rows, a row and a value', async () => {
    const sql = await open();
    const row = await sql.get<{ id: number }>('INSERT INTO t (v) VALUES (?) RETURNING id', ['a']);
    expect(row?.id).toBe(1);
    expect(await sql.all('SELECT v FROM t')).toEqual([{ v: 'a' }]);
    expect(await sql.value('SELECT count(*) FROM t WHERE v = @v', { v: 'a' })).toBe(1);
    expect(await sql.value('SELECT v FROM t WHERE id = 99')).toBeUndefined();
  });

  it('rolls a failed transaction back whole', async () => {
    const sql = await open();
    await expect(
      sql.tx(async () => {
        await sql.run("INSERT INTO t (v) VALUES ('in')");
        throw new Error('no');
      }),
    ).rejects.toThrow('no');
    expect(await sql.value('SELECT count(*) FROM t')).toBe(0);
  });

  it('keeps calls from outside a transaction out of it until it ends', async () => {
    const sql = await open();
    let release!: () => void;
    const gate = new Promise<void>((r) => {
      release = r;
    });
    const inside = sql.tx(async () => {
      await sql.run("INSERT INTO t (v) VALUES ('tx')");
      await gate;
      await sql.run("INSERT INTO t (v) VALUES ('tx2')");
    });
    // A read from outside waits: it must not see the uncommitted row, nor run inside the tx.
    const outside = sql.value<number>('SELECT count(*) FROM t');
    await new Promise((r) => setTimeout(r, 10));
    release();
    await inside;
    expect(await outside).toBe(2);
  });

  it('joins a transaction begun inside another', async () => {
    const sql = await open();
    await sql.tx(async () => {
      expect(sql.inTx()).toBe(true);
      await sql.tx(async () => {
        await sql.run("INSERT INTO t (v) VALUES ('nested')");
      });
    });
    expect(sql.inTx()).toBe(false);
    expect(await sql.value('SELECT count(*) FROM t')).toBe(1);
  });
});

describe('pagedRows', () => {
  it('yields every row once, in key order, across pages of PAGE_ROWS', async () => {
    const sql = new SqliteSql(openMemoryDatabase());
    await sql.run('CREATE TABLE t (id INTEGER PRIMARY KEY, v INTEGER)');
    const n = 2 * PAGE_ROWS + 7; // three pages, the last one short
    await sql.tx(async () => {
      for (let i = 1; i <= n; i++) await sql.run('INSERT INTO t (id, v) VALUES (?, ?)', [i * 3, i]);
    });
    const seen: number[] = [];
    for await (const r of pagedRows<{ id: number; v: number }>(
      sql,
      'SELECT id, v FROM t WHERE id > @after ORDER BY id LIMIT @pageRows',
      (r) => r.id,
    ))
      seen.push(r.v);
    expect(seen).toEqual(Array.from({ length: n }, (_, i) => i + 1));
  });
});
