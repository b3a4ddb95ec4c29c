// Prints the plain closing line the workplace's CI reads: "N passed, N failed[, N skipped]".
import { readFileSync } from 'node:fs';

const file = process.argv[2];
let report;
try {
  report = JSON.parse(readFileSync(file, 'utf8'));
} catch (err) {
  console.log(`ci: no vitest JSON report at ${file}: ${err.message}`);
  process.exit(1);
}
const passed = report.numPassedTests ?? 0;
const failed = report.numFailedTests ?? 0;
const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
if (passed === 0) process.exit(1);
