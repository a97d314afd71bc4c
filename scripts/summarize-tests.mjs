// Prints the one closing line CI reads: "N passed, N failed[, N skipped]", summed over vitest, Playwright and the
// extra checks (production smoke log, fuzz, private-folder clone), and exits 1 unless it says "0 failed".
// The line can only say "0 failed" when every runner finished, wrote its report, exited 0, collected at least the
// floor of tests kept in tests/floor.json, and raised no error outside a test. Each such problem counts as one
// failure and is explained on stderr above the line.
//
//   node scripts/summarize-tests.mjs [--vitest-rc N] [--playwright-rc N] [--expect-checks a,b] [--reports DIR]
//                                    [--floor FILE] [--no-e2e]
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const readJson = (file) => {
  if (!existsSync(file)) return undefined;
  try {
    return JSON.parse(readFileSync(file, 'utf8'));
  } catch {
    return null; // present but unreadable: the runner stopped while writing it
  }
};

/**
 * Pure tally over the reports, so it can be tested on crafted inputs.
 * @param {{
 *   vitest?: any, vitestStatus?: any, vitestRc?: number | null,
 *   playwright?: any, playwrightRc?: number | null, e2e?: boolean, buildFailed?: boolean,
 *   checks?: Record<string, any>, expectChecks?: string[],
 *   floor?: { vitest?: number, playwright?: number } | null,
 * }} r
 */
export function summarize(r) {
  let passed = 0;
  let failed = 0;
  let skipped = 0;
  const problems = [];
  const fail = (message, n = 1) => {
    failed += n;
    problems.push(message);
  };

  // ---- vitest ----
  const v = r.vitest;
  let vitestCount = 0;
  if (v === undefined) fail('vitest wrote no JSON report (it crashed or stopped before the end)');
  else if (v === null) fail('vitest JSON report is unreadable (cut short)');
  else {
    const results = Array.isArray(v.testResults) ? v.testResults : [];
    let vPassed = 0;
    let vFailed = 0;
    for (const file of results) {
      const asserts = Array.isArray(file.assertionResults) ? file.assertionResults : [];
      for (const a of asserts) {
        if (a.status === 'passed') vPassed += 1;
        else if (a.status === 'failed') vFailed += 1;
        else if (a.status === 'skipped' || a.status === 'todo') skipped += 1;
        else {
          // 'pending': never finished (the run was interrupted or the worker died)
          vFailed += 1;
          problems.push(`vitest: "${a.fullName ?? a.title}" in ${file.name} did not finish`);
        }
      }
      // a file that failed without a failing test: import error, error in a hook or at collection
      if (file.status === 'failed' && !asserts.some((a) => a.status === 'failed')) {
        vFailed += 1;
        problems.push(`vitest: ${file.name} failed outside any test: ${String(file.message || 'no message').split('\n')[0]}`);
      }
    }
    if (results.length === 0) fail('vitest collected no test files');
    else if (vPassed + vFailed === 0) fail('vitest ran no tests');
    passed += vPassed;
    failed += vFailed;
    vitestCount = vPassed + vFailed;
    if (vFailed) problems.push(`vitest: ${vFailed} failed`);

    const s = r.vitestStatus;
    if (!s) fail('vitest did not reach the end of its run (no run-status record)');
    else {
      const errors = Array.isArray(s.unhandledErrors) ? s.unhandledErrors : [];
      if (errors.length) fail(`vitest: ${errors.length} error(s) outside any test: ${errors.map((e) => String(e.message ?? e).split('\n')[0]).join(' | ')}`, errors.length);
      if (s.reason === 'interrupted') fail('vitest: the run was interrupted');
    }
    if (r.floor?.vitest && vitestCount < r.floor.vitest) fail(`vitest: ${vitestCount} tests ran, fewer than the floor of ${r.floor.vitest} (tests/floor.json)`);
  }
  if (r.vitestRc != null && r.vitestRc !== 0 && failed === 0) fail(`vitest exited ${r.vitestRc} although its report shows no failure`);

  // ---- Playwright ----
  if (r.e2e !== false) {
    const failedBefore = failed;
    if (r.buildFailed) fail('next build failed: the end-to-end tests and production checks did not run');
    const p = r.playwright;
    if (p === undefined) fail('Playwright wrote no JSON report (it crashed, or never started)');
    else if (p === null) fail('Playwright JSON report is unreadable (cut short)');
    else {
      const st = p.stats ?? {};
      const pPassed = (st.expected ?? 0) + (st.flaky ?? 0);
      const pFailed = st.unexpected ?? 0;
      passed += pPassed;
      failed += pFailed;
      skipped += st.skipped ?? 0;
      if (pFailed) problems.push(`Playwright: ${pFailed} failed`);
      // interrupted tests (a stop part-way) are reported as skipped with an 'interrupted' result
      let interrupted = 0;
      const walk = (suite) => {
        for (const spec of suite.specs ?? []) for (const t of spec.tests ?? []) if ((t.results ?? []).some((x) => x.status === 'interrupted')) interrupted += 1;
        for (const child of suite.suites ?? []) walk(child);
      };
      for (const suite of p.suites ?? []) walk(suite);
      if (interrupted) fail(`Playwright: ${interrupted} test(s) interrupted`, interrupted);
      const errors = Array.isArray(p.errors) ? p.errors : [];
      if (errors.length) fail(`Playwright: ${errors.length} error(s) outside any test: ${errors.map((e) => String(e.message ?? e).split('\n')[0]).join(' | ')}`, errors.length);
      if (pPassed + pFailed === 0) fail('Playwright ran no tests');
      if (r.floor?.playwright && pPassed + pFailed < r.floor.playwright) fail(`Playwright: ${pPassed + pFailed} tests ran, fewer than the floor of ${r.floor.playwright} (tests/floor.json)`);
    }
    if (r.playwrightRc != null && r.playwrightRc !== 0 && failed === failedBefore) fail(`Playwright exited ${r.playwrightRc} although its report shows no failure`);
  }

  // ---- extra checks: reports/checks/<name>.json = { passed, failed, problems?: string[] } ----
  const checks = r.checks ?? {};
  for (const name of r.expectChecks ?? []) if (!(name in checks)) fail(`check "${name}" wrote no result (it did not run or crashed)`);
  for (const [name, c] of Object.entries(checks)) {
    if (!c || typeof c !== 'object') {
      fail(`check "${name}": unreadable result`);
      continue;
    }
    const cp = Number(c.passed ?? 0);
    const cf = Number(c.failed ?? 0);
    passed += Number.isFinite(cp) ? cp : 0;
    if (!Number.isFinite(cf)) fail(`check "${name}": unreadable failure count`);
    else if (cf > 0) fail(`check "${name}": ${cf} failed${c.problems?.length ? `: ${c.problems.slice(0, 20).join(' | ')}` : ''}`, cf);
    else if (cp === 0) fail(`check "${name}" checked nothing`);
  }

  const line = `${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`;
  return { passed, failed, skipped, problems, line, ok: failed === 0 };
}

function arg(name) {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

function main() {
  const dir = arg('--reports') ?? 'reports';
  const rc = (name) => {
    const raw = arg(name);
    return raw === undefined ? null : Number(raw);
  };
  const checks = {};
  const checkDir = path.join(dir, 'checks');
  if (existsSync(checkDir)) for (const f of readdirSync(checkDir)) if (f.endsWith('.json')) checks[f.slice(0, -5)] = readJson(path.join(checkDir, f));
  const floorFile = arg('--floor') ?? 'tests/floor.json';
  const result = summarize({
    vitest: readJson(path.join(dir, 'vitest.json')),
    vitestStatus: readJson(path.join(dir, 'vitest-status.json')),
    vitestRc: rc('--vitest-rc'),
    playwright: readJson(path.join(dir, 'playwright.json')),
    playwrightRc: rc('--playwright-rc'),
    e2e: !process.argv.includes('--no-e2e'),
    buildFailed: existsSync(path.join(dir, 'build-failed')),
    checks,
    expectChecks: (arg('--expect-checks') ?? '').split(',').filter(Boolean),
    floor: readJson(floorFile) ?? null,
  });
  for (const p of result.problems) console.error(`[summary] ${p}`);
  console.log(result.line);
  process.exit(result.ok ? 0 : 1);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) main();
