// A vitest reporter that records how the run ended, which vitest's JSON report leaves out: errors raised outside
// any test (unhandled rejections and exceptions) and whether the run was interrupted. Read by
// scripts/summarize-tests.mjs. Output: $VITEST_STATUS_FILE or reports/vitest-status.json.
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';

export default class RunStatusReporter {
  onTestRunEnd(testModules, unhandledErrors, reason) {
    const file = process.env.VITEST_STATUS_FILE ?? 'reports/vitest-status.json';
    mkdirSync(path.dirname(file), { recursive: true });
    const errors = [...(unhandledErrors ?? [])].map((e) => ({ message: String(e?.message ?? e), stack: e?.stack ? String(e.stack).split('\n').slice(0, 8).join('\n') : undefined }));
    writeFileSync(file, JSON.stringify({ reason, modules: testModules.length, unhandledErrors: errors }, null, 2));
  }
}
