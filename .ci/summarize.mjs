// Prints the plain closing line the workplace's CI reads, "N passed, N failed", from vitest's JSON
// report, and exits non-zero unless every test that is meant to run ran and passed.
// A skipped, pending or todo test counts as failed (a missing browser or tool must not pass
// quietly), unless its full name is listed in ALLOWED_SKIPS with the reason. A test file that
// failed to load (no tests ran in it) counts as one failure. A second argument adds the number of
// CI steps that failed before the tests (type-check, lint, format, pack), each one failure.
import { readFileSync } from 'node:fs';

/** Full test names ("describe … it") allowed to skip, each with why. Keep it empty. */
const ALLOWED_SKIPS = new Map([]);

const file = process.argv[2];
const failedSteps = Number(process.argv[3] ?? 0) || 0;
let report;
try {
  report = JSON.parse(readFileSync(file, 'utf8'));
} catch (err) {
  console.log(`ci: no vitest JSON report at ${file}: ${err.message}`);
  console.log(`0 passed, ${1 + failedSteps} failed`);
  process.exit(1);
}

const notRun = new Set(['skipped', 'pending', 'todo', 'disabled']);
let passed = 0;
let failed = 0;
const skipped = [];
const brokenFiles = [];
for (const suite of report.testResults ?? []) {
  const tests = suite.assertionResults ?? [];
  for (const t of tests) {
    if (t.status === 'passed') passed++;
    else if (t.status === 'failed') failed++;
    else if (notRun.has(t.status))
      skipped.push({ file: suite.name, name: t.fullName ?? t.title, status: t.status });
    else failed++; // an unknown status is not a pass
  }
  if (suite.status === 'failed' && !tests.some((t) => t.status === 'failed'))
    brokenFiles.push(suite.name);
}

const unexplained = skipped.filter((s) => !ALLOWED_SKIPS.has(s.name));
for (const s of skipped) {
  const why = ALLOWED_SKIPS.get(s.name);
  console.log(
    `ci: ${s.status}: ${s.name} (${s.file})${why ? ` — allowed: ${why}` : ' — not allowed, counted as failed'}`,
  );
}
for (const f of brokenFiles)
  console.log(`ci: test file failed without a failing test (did not load?): ${f}`);

if (failedSteps)
  console.log(`ci: ${failedSteps} step(s) before the tests failed, counted as failed`);
failed += unexplained.length + brokenFiles.length + failedSteps;
if (passed === 0) console.log('ci: no test passed');
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed === 0 && passed > 0 && report.success !== false ? 0 : 1);
