#!/usr/bin/env bash
# Proves the closing line cannot pass by accident: runs small vitest runs that each go wrong in one way (a broken
# engine under the real engine tests, an error thrown outside any test, an unhandled rejection, a file that fails
# to import, a run that collects nothing, a run under the floor) and checks that scripts/summarize-tests.mjs
# prints a failing line and exits 1 for each, and "0 failed" with exit 0 for a clean run.
# The throw-away test files live in reports/ (outside vitest's include), so a concurrent npm test never sees them.
#   bash scripts/check-harness.sh [reports/checks/harness.json]
set -uo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
OUT="${1:-reports/checks/harness.json}"
WORK="reports/harness-check-$$"
mkdir -p "$WORK" "$(dirname "$OUT")"
trap 'rm -rf "$WORK"' EXIT

cat >"$WORK/vitest.config.mts" <<EOF
import base from '../../vitest.config.mts';
export default { ...base, test: { ...base.test, include: ['$WORK/case/**/*.check.ts'], setupFiles: [] } };
EOF

passed=0
failed=0
problems=()

# run_case <name> <expect: pass|fail> <floor json> ; test files already in $WORK/case
run_case() {
  local name="$1" expect="$2" floor="$3"
  rm -f "$WORK/vitest.json" "$WORK/vitest-status.json"
  echo "$floor" >"$WORK/floor.json"
  VITEST_STATUS_FILE="$WORK/vitest-status.json" node node_modules/vitest/vitest.mjs run --root "$ROOT" --config "$WORK/vitest.config.mts" \
    --reporter=json --reporter=./scripts/vitest-run-status.mjs --outputFile.json="$WORK/vitest.json" >"$WORK/$name.log" 2>&1
  local vrc=$?
  local line
  line="$(node scripts/summarize-tests.mjs --reports "$WORK" --no-e2e --floor "$WORK/floor.json" --vitest-rc "$vrc" 2>>"$WORK/$name.log")"
  local src=$?
  local got=pass
  { [ $src -ne 0 ] || ! [[ "$line" =~ \ 0\ failed ]]; } && got=fail
  # the line and the exit status must agree
  if { [ $src -eq 0 ] && ! [[ "$line" =~ \ 0\ failed ]]; } || { [ $src -ne 0 ] && [[ "$line" =~ \ 0\ failed ]]; }; then got=disagree; fi
  if [ "$got" = "$expect" ]; then
    passed=$((passed + 1)); echo "[harness] ok   $name: \"$line\" (exit $src)"
  else
    failed=$((failed + 1)); problems+=("$name: expected $expect, got $got (\"$line\", exit $src)"); echo "[harness] FAIL $name: expected $expect, got $got: \"$line\" (exit $src)" >&2
    sed 's/^/    /' "$WORK/$name.log" | tail -n 15 >&2
  fi
  rm -rf "$WORK/case"
}
new_case() { rm -rf "$WORK/case"; mkdir -p "$WORK/case"; }

new_case
cat >"$WORK/case/clean.check.ts" <<'EOF'
import { expect, it } from 'vitest';
it('adds', () => expect(1 + 1).toBe(2));
EOF
run_case clean pass '{"vitest":1}'

new_case
cat >"$WORK/case/broken-engine.check.ts" <<'EOF'
// the real engine tests against an engine that refuses every stage
import { vi } from 'vitest';
vi.mock('@/lib/calc', async (importOriginal) => {
  const real = await importOriginal<typeof import('@/lib/calc')>();
  return { ...real, analyzeStage: () => { throw new real.CalcError('no-solution', 'deliberately broken'); } };
});
await import('../../../tests/unit/calc/properties.test');
await import('../../../tests/unit/calc/worked-example.test');
await import('../../../tests/unit/calc/datasheet-points.test');
EOF
run_case broken-engine fail '{"vitest":1}'

new_case
cat >"$WORK/case/refusing-engine.check.ts" <<'EOF'
// the random-input property tests alone, against an engine that refuses every stage with a documented error kind
import { vi } from 'vitest';
vi.mock('@/lib/calc', async (importOriginal) => {
  const real = await importOriginal<typeof import('@/lib/calc')>();
  return { ...real, analyzeStage: () => { throw new real.CalcError('cutoff', 'deliberately broken'); } };
});
await import('../../../tests/unit/calc/properties.test');
EOF
run_case refusing-engine-properties fail '{"vitest":1}'

new_case
cat >"$WORK/case/nan-engine.check.ts" <<'EOF'
// an engine that answers NaN plate currents
import { vi } from 'vitest';
vi.mock('@/lib/calc', async (importOriginal) => {
  const real = await importOriginal<typeof import('@/lib/calc')>();
  return { ...real, analyzeStage: (input: Parameters<typeof real.analyzeStage>[0]) => { const r = real.analyzeStage(input); return { ...r, operatingPoint: { ...r.operatingPoint, plateCurrent: Number.NaN } }; } };
});
await import('../../../tests/unit/calc/properties.test');
EOF
run_case nan-engine fail '{"vitest":1}'

new_case
cat >"$WORK/case/throw-outside.check.ts" <<'EOF'
import { expect, it } from 'vitest';
it('passes, but leaves a timer that throws after it', () => {
  setTimeout(() => { throw new Error('thrown outside any test'); }, 0);
  expect(true).toBe(true);
});
it('waits a little', async () => { await new Promise((r) => setTimeout(r, 50)); });
EOF
run_case throw-outside-test fail '{"vitest":1}'

new_case
cat >"$WORK/case/rejection.check.ts" <<'EOF'
import { expect, it } from 'vitest';
it('passes, but leaks a rejected promise', async () => {
  void Promise.reject(new Error('unhandled rejection outside any test'));
  await new Promise((r) => setTimeout(r, 50));
  expect(true).toBe(true);
});
EOF
run_case unhandled-rejection fail '{"vitest":1}'

new_case
cat >"$WORK/case/ok.check.ts" <<'EOF'
import { expect, it } from 'vitest';
it('passes', () => expect(1).toBe(1));
EOF
cat >"$WORK/case/import.check.ts" <<'EOF'
import { it } from 'vitest';
import { missing } from './no-such-module';
it('never runs', () => void missing);
EOF
run_case failed-import fail '{"vitest":1}'

new_case
cat >"$WORK/case/throw-at-load.check.ts" <<'EOF'
import { it } from 'vitest';
throw new Error('thrown while the file is collected');
it('never runs', () => {});
EOF
run_case throw-at-collection fail '{"vitest":0}'

new_case
run_case empty-run fail '{"vitest":0}'

new_case
cat >"$WORK/case/one.check.ts" <<'EOF'
import { expect, it } from 'vitest';
it('passes', () => expect(1).toBe(1));
EOF
run_case under-the-floor fail '{"vitest":5}'

node -e 'const [p,f,...pr]=process.argv.slice(1);process.stdout.write(JSON.stringify({passed:+p,failed:+f,problems:pr}))' "$passed" "$failed" "${problems[@]}" >"$OUT"
echo "[harness] $passed of $((passed + failed)) harness cases behaved as expected"
[ "$failed" -eq 0 ]
