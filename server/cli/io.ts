import { readFileSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { InputError } from '../core/errors.js';

/**
 * Exit codes: 0 done, 2 refused input (one line on stderr), 3 fitted but the fit did not converge
 * (a script must not take its numbers), 70 internal fault (EX_SOFTWARE).
 */
export const EXIT_OK = 0;
export const EXIT_REFUSED = 2;
export const EXIT_NOT_CONVERGED = 3;
export const EXIT_INTERNAL = 70;

export const DEFAULT_MAX_FILE_BYTES = 64 * 1024 * 1024;

/** Read a file a person named, refusing missing, unreadable or oversized ones with an InputError. */
export function readInputFile(
  path: string,
  maxBytes = DEFAULT_MAX_FILE_BYTES,
): { bytes: Uint8Array; fileName: string } {
  const fileName = basename(path);
  let size: number;
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw new InputError('is a folder, not a file', { file: path });
    size = st.size;
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError('no such file, or it cannot be read', { file: path });
  }
  if (size > maxBytes) {
    throw new InputError(
      `file is ${(size / 1048576).toFixed(1)} MiB, over the ${(maxBytes / 1048576).toFixed(0)} MiB limit`,
      { file: path },
    );
  }
  try {
    return { bytes: new Uint8Array(readFileSync(path)), fileName };
  } catch {
    throw new InputError('cannot be read', { file: path });
  }
}

/** Run a command body; turn refusals into one line and exit 2, and anything else into exit 70. */
export async function guarded(body: () => Promise<number> | number): Promise<number> {
  try {
    return await body();
  } catch (err) {
    if (err instanceof InputError) {
      process.stderr.write(`efflux: ${err.toLine()}\n`);
      return EXIT_REFUSED;
    }
    const message = err instanceof Error ? err.message : String(err);
    process.stderr.write(
      `efflux: internal fault: ${message}\n(this is a bug in efflux; set EFFLUX_DEBUG=1 for details)\n`,
    );
    if (process.env.EFFLUX_DEBUG === '1' && err instanceof Error)
      process.stderr.write(`${err.stack}\n`);
    return EXIT_INTERNAL;
  }
}
