// Prints the one closing line CI reads: "N passed, N failed[, N skipped]", summed over vitest and Playwright.
import { existsSync, readFileSync } from 'node:fs';

let passed = 0;
let failed = 0;
let skipped = 0;

if (existsSync('reports/vitest.json')) {
  const v = JSON.parse(readFileSync('reports/vitest.json', 'utf8'));
  passed += v.numPassedTests ?? 0;
  failed += (v.numFailedTests ?? 0) + (v.numFailedTestSuites && !v.numFailedTests ? v.numFailedTestSuites : 0);
  skipped += (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0);
} else {
  failed += 1;
}

if (existsSync('reports/playwright.json')) {
  const p = JSON.parse(readFileSync('reports/playwright.json', 'utf8'));
  passed += (p.stats?.expected ?? 0) + (p.stats?.flaky ?? 0);
  failed += p.stats?.unexpected ?? 0;
  skipped += p.stats?.skipped ?? 0;
  if ((p.errors ?? []).length && !p.stats?.unexpected) failed += 1;
} else {
  failed += 1;
}

console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 ? 1 : 0);
