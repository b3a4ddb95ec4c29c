/**
 * Room kept for the compensating step. `efflux.reserve` is a file of zeros in the data folder;
 * when a full disk stops an upload between its bytes and its fit, the file is deleted so the
 * withdrawal (a delete and its audit entry, written to the WAL) has room, then made again when
 * space allows. Without it the withdrawal itself fails on the full disk and the test is left pending.
 */
import { closeSync, existsSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { join } from 'node:path';

export const RESERVE_FILE = 'efflux.reserve';
export const DEFAULT_RESERVE_BYTES = 4 * 1024 * 1024;

export class DiskReserve {
  readonly path: string;
  constructor(
    dataDir: string,
    readonly bytes = DEFAULT_RESERVE_BYTES,
  ) {
    this.path = join(dataDir, RESERVE_FILE);
  }

  /** Makes the file if it is missing; false (and no partial file) when the disk has no room for it. */
  ensure(): boolean {
    if (existsSync(this.path)) return true;
    const part = `${this.path}.partial`;
    const chunk = Buffer.alloc(64 * 1024);
    let fd: number | null = null;
    try {
      fd = openSync(part, 'w');
      for (let n = 0; n < this.bytes; )
        n += writeSync(fd, chunk, 0, Math.min(chunk.length, this.bytes - n));
      closeSync(fd);
      fd = null;
      // rename last, so a half-written reserve is never taken for a whole one
      renameSync(part, this.path);
      return true;
    } catch {
      if (fd !== null) closeSync(fd);
      rmSync(part, { force: true });
      return false;
    }
  }

  /** Frees the room, runs the step, and tries to put the room back. */
  async spend<T>(step: () => T | Promise<T>): Promise<T> {
    rmSync(this.path, { force: true });
    try {
      // awaited here, so the room is made again only after the step has finished writing
      return await step();
    } finally {
      this.ensure();
    }
  }
}
