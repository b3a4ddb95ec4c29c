/**
 * Piscina worker of the task pool (tasks.ts): runs one task and answers its bytes (moved, not
 * copied) or `{value}`, or `{error}` flattened to plain fields (worker-reply.ts) so an InputError
 * keeps its file, line and field across the thread boundary.
 */
import { setPriority } from 'node:os';
import { workerData } from 'node:worker_threads';
import { Piscina } from 'piscina';
import { runTask, type TaskKind } from './task-kinds.js';
import { serialiseError } from './worker-reply.js';

// Below the HTTP thread's priority, so reads keep answering while a report renders (Linux keeps a
// nice value per thread; elsewhere this may be refused, and the task runs at the normal priority).
const niceness = (workerData as { niceness?: number } | undefined)?.niceness ?? 0;
if (niceness > 0 && process.platform === 'linux') {
  try {
    setPriority(0, niceness);
  } catch {
    // not permitted
  }
}

export default async function run(task: { kind: TaskKind; input: never }): Promise<unknown> {
  try {
    const out = await runTask(task.kind, task.input);
    // a view that owns its whole buffer moves as is; a slice of a shared pool is copied first
    if (out instanceof Uint8Array)
      return Piscina.move(
        out.byteOffset === 0 && out.byteLength === out.buffer.byteLength
          ? out
          : new Uint8Array(out),
      );
    return { value: out };
  } catch (e) {
    return { error: serialiseError(e) };
  }
}
