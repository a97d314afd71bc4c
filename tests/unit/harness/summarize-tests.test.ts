import { describe, expect, it } from 'vitest';
import { summarize } from '../../../scripts/summarize-tests.mjs';

// The closing line of `npm test` over crafted runner reports: it says "0 failed" only for a complete, clean run,
// and its count of failures always agrees with its exit status.

const vitestFile = (name: string, statuses: string[], fileStatus?: 'passed' | 'failed', message = '') => ({
  name,
  status: fileStatus ?? (statuses.includes('failed') ? 'failed' : 'passed'),
  message,
  assertionResults: statuses.map((status, i) => ({ status, title: `t${i}`, fullName: `${name} t${i}` })),
});
const vitest = (...files: ReturnType<typeof vitestFile>[]) => ({ testResults: files });
const cleanStatus = { reason: 'passed', modules: 1, unhandledErrors: [] };
const playwright = (stats: Partial<Record<'expected' | 'unexpected' | 'flaky' | 'skipped', number>>, extra: Record<string, unknown> = {}) => ({
  stats: { expected: 0, unexpected: 0, flaky: 0, skipped: 0, ...stats },
  suites: [],
  errors: [],
  ...extra,
});
const clean = {
  vitest: vitest(vitestFile('a.test.ts', ['passed', 'passed', 'skipped'])),
  vitestStatus: cleanStatus,
  vitestRc: 0,
  playwright: playwright({ expected: 3 }),
  playwrightRc: 0,
  checks: { fuzz: { passed: 1, failed: 0 } },
  expectChecks: ['fuzz'],
  floor: { vitest: 2, playwright: 3 },
};

describe('closing line of npm test', () => {
  it('a clean run passes and says so', () => {
    const s = summarize(clean);
    expect(s.line).toBe('6 passed, 0 failed, 1 skipped');
    expect(s.ok).toBe(true);
  });

  it('a failing test fails the line', () => {
    const s = summarize({ ...clean, vitest: vitest(vitestFile('a.test.ts', ['passed', 'failed'])), vitestRc: 1 });
    expect(s.failed).toBe(1);
    expect(s.ok).toBe(false);
  });

  it('an unhandled rejection outside any test fails the line although every test passed', () => {
    const s = summarize({ ...clean, vitestStatus: { reason: 'failed', unhandledErrors: [{ message: 'stray rejection' }] }, vitestRc: 1 });
    expect(s.failed).toBe(1);
    expect(s.problems.join('\n')).toMatch(/outside any test: stray rejection/);
  });

  it('a file that fails to import (no test inside it fails) counts as a failure', () => {
    const s = summarize({ ...clean, vitest: vitest(vitestFile('a.test.ts', ['passed']), vitestFile('b.test.ts', [], 'failed', 'Cannot find module')) });
    expect(s.failed).toBe(1);
    expect(s.ok).toBe(false);
  });

  it('a runner that stopped early (no report, cut report, unfinished tests, no end record) fails', () => {
    expect(summarize({ ...clean, vitest: undefined }).ok).toBe(false);
    expect(summarize({ ...clean, vitest: null }).ok).toBe(false);
    expect(summarize({ ...clean, vitest: vitest(vitestFile('a.test.ts', ['passed', 'passed', 'pending'])) }).failed).toBe(1);
    expect(summarize({ ...clean, vitestStatus: undefined }).failed).toBe(1);
    expect(summarize({ ...clean, vitestStatus: { ...cleanStatus, reason: 'interrupted' } }).failed).toBe(1);
    expect(summarize({ ...clean, playwright: undefined }).failed).toBe(1);
  });

  it('a non-zero exit with a clean report still fails', () => {
    expect(summarize({ ...clean, vitestRc: 137 }).failed).toBe(1);
    expect(summarize({ ...clean, playwrightRc: 1 }).failed).toBe(1);
  });

  it('an empty run fails: no files, or files without tests', () => {
    expect(summarize({ ...clean, vitest: vitest(), floor: null }).ok).toBe(false);
    expect(summarize({ ...clean, vitest: vitest(vitestFile('a.test.ts', [])), floor: null }).ok).toBe(false);
    expect(summarize({ ...clean, playwright: playwright({}), floor: null }).ok).toBe(false);
  });

  it('fewer tests than the floor in tests/floor.json fails', () => {
    const s = summarize({ ...clean, floor: { vitest: 3, playwright: 3 } });
    expect(s.failed).toBe(1);
    expect(s.problems.join('\n')).toMatch(/fewer than the floor of 3/);
    expect(summarize({ ...clean, floor: { vitest: 2, playwright: 4 } }).failed).toBe(1);
  });

  it('Playwright: global errors, interrupted tests and a failed build fail the line', () => {
    expect(summarize({ ...clean, playwright: playwright({ expected: 3 }, { errors: [{ message: 'webServer exited early' }] }) }).failed).toBe(1);
    const interrupted = playwright({ expected: 3, skipped: 1 }, { suites: [{ specs: [{ tests: [{ results: [{ status: 'interrupted' }] }] }] }] });
    expect(summarize({ ...clean, playwright: interrupted }).failed).toBe(1);
    expect(summarize({ ...clean, buildFailed: true, playwright: undefined }).failed).toBe(2);
    expect(summarize({ ...clean, playwright: playwright({ expected: 2, unexpected: 1 }), playwrightRc: 1 }).failed).toBe(1);
  });

  it('extra checks: a 5xx found by the fuzz, a missing or empty check result fail the line', () => {
    expect(summarize({ ...clean, checks: { fuzz: { passed: 0, failed: 3, problems: ['POST /api/x → 500'] } } }).failed).toBe(3);
    expect(summarize({ ...clean, checks: {} }).failed).toBe(1);
    expect(summarize({ ...clean, checks: { fuzz: { passed: 0, failed: 0 } } }).failed).toBe(1);
    expect(summarize({ ...clean, checks: { fuzz: null } }).failed).toBe(1);
  });

  it('the exit status always agrees with the line', () => {
    const variants = [clean, { ...clean, vitestRc: 1 }, { ...clean, vitest: undefined }, { ...clean, checks: {} }, { ...clean, playwright: playwright({ expected: 3, flaky: 1 }) }];
    for (const v of variants) {
      const s = summarize(v);
      expect(s.ok).toBe(/ 0 failed/.test(s.line));
    }
  });
});
