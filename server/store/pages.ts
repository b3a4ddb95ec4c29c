import type { Sql, SqlValue } from './sql.js';

/** Rows a page holds: enough to keep the round trips few, little enough to keep memory flat. */
export const PAGE_ROWS = 1000;

/**
 * Every row of a long scan, a page at a time by a rising integer key (keyset paging), so a scan of
 * the whole audit log never holds it all. `select` must read `@after` and `@pageRows` as in
 * `… WHERE seq > @after ORDER BY seq LIMIT @pageRows`, and `keyOf` give a row's key.
 */
export async function* pagedRows<T>(
  sql: Sql,
  select: string,
  keyOf: (row: T) => number,
  params: Record<string, SqlValue> = {},
  after = 0,
): AsyncGenerator<T> {
  let last = after;
  for (;;) {
    const rows = await sql.all<T>(select, { ...params, after: last, pageRows: PAGE_ROWS });
    for (const r of rows) yield r;
    if (rows.length < PAGE_ROWS) return;
    last = keyOf(rows[rows.length - 1]);
  }
}
