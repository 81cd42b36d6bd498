// Print "N passed, N failed" (", N skipped" when any) from vitest's JSON report.
import { existsSync, readFileSync } from 'node:fs';

const file = process.argv[2];
if (!existsSync(file)) {
  console.log('0 passed, 1 failed');
  console.error(`no test report at ${file}: the build or the test run did not finish`);
  process.exit(0);
}
const r = JSON.parse(readFileSync(file, 'utf8'));
const skipped = (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
console.log(`${r.numPassedTests} passed, ${r.numFailedTests} failed${skipped ? `, ${skipped} skipped` : ''}`);
