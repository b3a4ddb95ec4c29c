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

  open(row: {
    id: string;
    vesselId: number;
    outletId: number | null;
    fileName: string;
    request: Record<string, unknown>;
    openedBy: Actor;
  }): LiveTestRow {
    const at = this.c.now();
    this.c.db
      .prepare(
        'INSERT INTO live_tests (id, vessel_id, outlet_id, file_name, request, opened_by_id, opened_by, opened_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)',
      )
      .run(
        row.id,
        row.vesselId,
        row.outletId,
        row.fileName,
        JSON.stringify(row.request),
        row.openedBy.id,
        row.openedBy.name,
        at,
      );
    return this.get(row.id)!;
  }

  get(id: string): LiveTestRow | null {
    const r = this.c.db.prepare('SELECT * FROM live_tests WHERE id = ?').get(id) as Row | undefined;
    return r ? toLive(r) : null;
  }

  listOpen(): LiveTestRow[] {
    return (
      this.c.db
        .prepare("SELECT * FROM live_tests WHERE status = 'open' ORDER BY opened_at")
        .all() as Row[]
    ).map(toLive);
  }

  /** Commit a piece that starts at the live test's current end; returns the new count of bytes. */
  append(id: string, offset: number, bytes: Uint8Array): number {
    return this.c.db
      .transaction(() => {
        const r = this.c.db
          .prepare("SELECT received_bytes FROM live_tests WHERE id = ? AND status = 'open'")
          .get(id) as { received_bytes: number } | undefined;
        if (!r || r.received_bytes !== offset)
          throw new Error(
            `live test ${id}: piece at ${offset} does not follow the ${r?.received_bytes ?? 'missing'} bytes held`,
          );
        this.c.db
          .prepare('INSERT INTO live_test_pieces (live_id, offset_bytes, bytes) VALUES (?, ?, ?)')
          .run(id, offset, Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength));
        const total = offset + bytes.byteLength;
        this.c.db.prepare('UPDATE live_tests SET received_bytes = ? WHERE id = ?').run(total, id);
        return total;
      })
      .immediate();
  }

  /** Every byte received, in order. */
  bytes(id: string): Buffer {
    const rows = this.c.db
      .prepare('SELECT bytes FROM live_test_pieces WHERE live_id = ? ORDER BY offset_bytes')
      .all(id) as { bytes: Buffer }[];
    return Buffer.concat(rows.map((r) => r.bytes));
  }

  finish(id: string, status: 'closed' | 'abandoned', testId: number | null = null): void {
    this.c.db
      .transaction(() => {
        this.c.db
          .prepare('UPDATE live_tests SET status = ?, test_id = ? WHERE id = ?')
          .run(status, testId, id);
        this.c.db.prepare('DELETE FROM live_test_pieces WHERE live_id = ?').run(id);
      })
      .immediate();
  }
}
