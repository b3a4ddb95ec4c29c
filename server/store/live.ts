import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';

/**
 * Live drain tests' staging area (migration 005): the test's opening request and the bytes
 * received so far, piece by piece. Each piece is committed before the sender is told it arrived.
 * The pieces are dropped when the live test is closed (its bytes are then an ordinary test's raw
 * file) or abandoned; the row stays as a record of the live test.
 */
export interface LiveTestRow {
  id: string;
  vesselId: number;
  outletId: number | null;
  fileName: string;
  request: Record<string, unknown>;
  openedBy: Actor;
  openedAt: string;
  status: 'open' | 'closed' | 'abandoned';
  testId: number | null;
  receivedBytes: number;
}

interface Row {
  id: string;
  vessel_id: number;
  outlet_id: number | null;
  file_name: string;
  request: string;
  opened_by_id: number | null;
  opened_by: string;
  opened_at: string;
  status: LiveTestRow['status'];
  test_id: number | null;
  received_bytes: number;
}

const toLive = (r: Row): LiveTestRow => ({
  id: r.id,
  vesselId: r.vessel_id,
  outletId: r.outlet_id,
  fileName: r.file_name,
  request: JSON.parse(r.request),
  openedBy: { id: r.opened_by_id, name: r.opened_by },
  openedAt: r.opened_at,
  status: r.status,
  testId: r.test_id,
  receivedBytes: r.received_bytes,
});

export class LiveRepo {
  constructor(private readonly c: StoreContext) {}

  async open(row: {
    id: string;
    vesselId: number;
    outletId: number | null;
    fileName: string;
    request: Record<string, unknown>;
    openedBy: Actor;
  }): Promise<LiveTestRow> {
    const at = this.c.now();
    await this.c.sql.run(
      'INSERT INTO live_tests (id, vessel_id, outlet_id, file_name, request, opened_by_id, opened_by, opened_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
      [
        row.id,
        row.vesselId,
        row.outletId,
        row.fileName,
        JSON.stringify(row.request),
        row.openedBy.id,
        row.openedBy.name,
        at,
      ],
    );
    return (await this.get(row.id))!;
  }

  async get(id: string): Promise<LiveTestRow | null> {
    const r = await this.c.sql.get<Row>('SELECT * FROM live_tests WHERE id = ?', [id]);
    return r ? toLive(r) : null;
  }

  async listOpen(): Promise<LiveTestRow[]> {
    return (
      await this.c.sql.all<Row>("SELECT * FROM live_tests WHERE status = 'open' ORDER BY opened_at")
    ).map(toLive);
  }

  /** Commit a piece that starts at the live test's current end; returns the new count of bytes. */
  async append(id: string, offset: number, bytes: Uint8Array): Promise<number> {
    return this.c.sql.tx(async () => {
      const r = await this.c.sql.get<{ received_bytes: number }>(
        "SELECT received_bytes FROM live_tests WHERE id = ? AND status = 'open'",
        [id],
      );
      if (!r || Number(r.received_bytes) !== offset)
        throw new Error(
          `live test ${id}: piece at ${offset} does not follow the ${r?.received_bytes ?? 'missing'} bytes held`,
        );
      await this.c.sql.run(
        'INSERT INTO live_test_pieces (live_id, offset_bytes, bytes) VALUES (?, ?, ?)',
        [id, offset, Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)],
      );
      const total = offset + bytes.byteLength;
      await this.c.sql.run('UPDATE live_tests SET received_bytes = ? WHERE id = ?', [total, id]);
      return total;
    });
  }

  /** Every byte received, in order. */
  async bytes(id: string): Promise<Buffer> {
    const rows = await this.c.sql.all<{ bytes: Buffer }>(
      'SELECT bytes FROM live_test_pieces WHERE live_id = ? ORDER BY offset_bytes',
      [id],
    );
    return Buffer.concat(rows.map((r) => r.bytes));
  }

  async finish(
    id: string,
    status: 'closed' | 'abandoned',
    testId: number | null = null,
  ): Promise<void> {
    await this.c.sql.tx(async () => {
      await this.c.sql.run('UPDATE live_tests SET status = ?, test_id = ? WHERE id = ?', [
        status,
        testId,
        id,
      ]);
      await this.c.sql.run('DELETE FROM live_test_pieces WHERE live_id = ?', [id]);
    });
  }
}
