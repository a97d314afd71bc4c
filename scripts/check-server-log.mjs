// Scans the production server's log (stdout + stderr of `next start`) for errors nobody handled: Next's "⨯" error
// lines, the API's "[api] unhandled error" (a 500), engine and report failures, bare errors, server-component
// error digests, uncaught exceptions and unhandled rejections.
// Writes { passed, failed, problems } for the closing line of npm test.
//   node scripts/check-server-log.mjs reports/server.log reports/checks/server-log.json
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

const [logFile = 'reports/server.log', out = 'reports/checks/server-log.json'] = process.argv.slice(2);
const PATTERNS = [
  /⨯/, // Next's own error lines
  /\[api\] unhandled error/i, // lib/api/errors.ts: an answer of 500
  /\[stages\] engine failed/, // the engine threw something other than a CalcError
  /\[report\]|report rendering failed/, // a PDF that could not be rendered
  /\[jobs\] /, // the job queue reported an error
  /unhandled ?rejection/i,
  /uncaught ?exception/i,
  /^\s*(Type|Reference|Range|Syntax|URI)?Error: /, // a bare error printed by console.error(err)
  /\bdigest: ?['"]/, // a server component error (production hides its message behind a digest)
  /\bFATAL\b/,
];

const problems = [];
let lines = 0;
if (!existsSync(logFile)) problems.push(`no server log at ${logFile}`);
else {
  const text = readFileSync(logFile, 'utf8');
  const all = text.split('\n');
  lines = all.length;
  if (!/Ready in|started server|Local:/i.test(text)) problems.push('the server log does not show the server starting');
  const seen = new Map();
  all.forEach((line, i) => {
    if (!PATTERNS.some((p) => p.test(line))) return;
    const key = line.replace(/\d+/g, 'N').trim().slice(0, 160);
    if (!seen.has(key)) seen.set(key, { first: i + 1, count: 0, text: line.trim().slice(0, 300), next: (all[i + 1] ?? '').trim().slice(0, 200) });
    seen.get(key).count += 1;
  });
  for (const v of seen.values()) problems.push(`line ${v.first} (${v.count}×): ${v.text}${v.next ? ` / ${v.next}` : ''}`);
}
mkdirSync(path.dirname(out), { recursive: true });
writeFileSync(out, JSON.stringify({ passed: problems.length ? 0 : 1, failed: problems.length, problems, lines }, null, 2));
for (const p of problems) console.error(`[server-log] ${p}`);
console.log(`[server-log] ${lines} lines, ${problems.length} unhandled-error signature(s)`);
process.exit(problems.length ? 1 : 0);
