/**
 * A stand-in engine for the resume test: a log whose first reading line says FAIL fails (not an
 * input refusal); FAIL_UNTIL_GATE fails until the gate file exists; one that says GATE waits until the file named by EFFLUX_TEST_GATE exists; the
 * rest go to the HTTP tests' stand-in.
 */
import { existsSync } from 'node:fs';
import type { AnalysisRequest } from '../../server/core/analysis-contract.js';
import { analyzeDrainTest as plain } from '../http/fake-analyze.js';

export function analyzeDrainTest(req: AnalysisRequest) {
  const text = new TextDecoder().decode(req.log.bytes);
  if (text.includes('FAIL_UNTIL_GATE') && !existsSync(process.env.EFFLUX_TEST_GATE!))
    throw new Error('the stand-in engine is not ready yet');
  if (text.includes('FAIL_UNTIL_GATE'))
    return plain({
      ...req,
      log: { ...req.log, bytes: new TextEncoder().encode(text.replace(/^FAIL_UNTIL_GATE\n/m, '')) },
    });
  if (text.includes('FAIL')) throw new Error('the stand-in engine failed on purpose');
  if (text.includes('GATE')) {
    const gate = process.env.EFFLUX_TEST_GATE!;
    const pause = new Int32Array(new SharedArrayBuffer(4));
    while (!existsSync(gate)) Atomics.wait(pause, 0, 0, 20);
    return plain({
      ...req,
      log: { ...req.log, bytes: new TextEncoder().encode(text.replace(/^GATE\n/m, '')) },
    });
  }
  return plain(req);
}
