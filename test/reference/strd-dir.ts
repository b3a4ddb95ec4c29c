/** The committed NIST StRD nonlinear-regression files (test/reference/nist-strd, see its README). */
import { fileURLToPath } from 'node:url';

export const STRD_DIR = fileURLToPath(new URL('./nist-strd/', import.meta.url));
