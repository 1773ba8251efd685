// Adds up vitest's JSON report and the browser-test line into one closing line "N passed, N failed".
// A failed typecheck or build counts as one failure each (argv[2]); a missing report counts as failed.
import { existsSync, readFileSync } from 'node:fs';

let passed = 0;
let failed = Number(process.argv[2] ?? 0);
if (existsSync('test-results/vitest.json')) {
  const r = JSON.parse(readFileSync('test-results/vitest.json', 'utf8'));
  passed += r.numPassedTests ?? 0;
  failed += r.numFailedTests ?? 0;
  // A test file that failed to load has no failed test inside it: count it once.
  for (const f of r.testResults ?? []) {
    if (f.status === 'failed' && !(f.assertionResults ?? []).some((a) => a.status === 'failed')) failed += 1;
  }
  if ((r.numTotalTests ?? 0) === 0) failed += 1;
} else {
  console.log('unit tests: no report written');
  failed += 1;
}
const log = existsSync('test-results/e2e.log') ? readFileSync('test-results/e2e.log', 'utf8') : '';
const m = [...log.matchAll(/^e2e: (\d+) passed, (\d+) failed/gm)].pop();
if (m) {
  passed += Number(m[1]);
  failed += Number(m[2]);
} else {
  console.log('browser tests: no result line');
  failed += 1;
}
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
