// API load benchmark (autocannon) against a running production server, signed in as the demo designer:
// POST /api/analyze (the stage editor's live analysis) and a project page, at several concurrencies.
// Prints requests/s and latency p50 / p99 per concurrency. Figures only: nothing here passes or fails on speed.
//
//   npm run bench:api                                  # own production server on a fresh database
//   BASE_URL=http://127.0.0.1:3100 tsx bench/api.bench.ts [--seconds 10] [--connections 1,8,16]
import { readFileSync } from 'node:fs';
import path from 'node:path';
import autocannon from 'autocannon';

function opt(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1]! : fallback;
}
const BASE = (process.env.BASE_URL ?? 'http://127.0.0.1:3000').replace(/\/$/, '');
const SECONDS = Number(opt('seconds', '10'));
const CONNECTIONS = opt('connections', '1,8,16').split(',').map(Number);
const PASSWORD = process.env.DEMO_PASSWORD ?? 'anodyne-demo';

async function signIn(email: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const pair = c.split(';')[0]!;
      jar.set(pair.split('=')[0]!, pair);
    }
  };
  const cookie = () => [...jar.values()].join('; ');
  const csrf = await fetch(`${BASE}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${BASE}/api/auth/callback/credentials`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookie(), origin: BASE },
    body: new URLSearchParams({ csrfToken, email, password: PASSWORD, json: 'true' }),
    redirect: 'manual',
  });
  keep(res);
  const me = await fetch(`${BASE}/api/me`, { headers: { cookie: cookie() } });
  if (me.status !== 200) throw new Error(`sign-in as ${email} failed (${me.status})`);
  return cookie();
}

interface Row {
  target: string;
  connections: number;
  rps: number;
  p50: number;
  p99: number;
  non2xx: number;
  errors: number;
}

async function load(target: string, opts: autocannon.Options): Promise<Row[]> {
  const rows: Row[] = [];
  for (const connections of CONNECTIONS) {
    // a short warm-up so the first figures do not include compilation of the route
    await autocannon({ ...opts, connections, duration: 2 });
    const r = await autocannon({ ...opts, connections, duration: SECONDS });
    rows.push({ target, connections, rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, non2xx: r.non2xx, errors: r.errors + r.timeouts });
    console.log(`  ${target.padEnd(24)} ${String(connections).padStart(3)} conn  ${r.requests.average.toFixed(0).padStart(6)} req/s  p50 ${String(r.latency.p50).padStart(4)} ms  p99 ${String(r.latency.p99).padStart(4)} ms${r.non2xx ? `  (${r.non2xx} non-2xx)` : ''}${r.errors + r.timeouts ? `  (${r.errors + r.timeouts} errors)` : ''}`);
  }
  return rows;
}

async function main() {
  const cookie = await signIn('designer@anodyne.test');
  const projects = ((await (await fetch(`${BASE}/api/projects`, { headers: { cookie } })).json()) as { projects: { id: number }[] }).projects;
  if (!projects.length) throw new Error('no project to load: seed the demo data first');
  // the project with the most stages, as a designer would open it
  let page = `/projects/${projects[0]!.id}`;
  let most = -1;
  for (const p of projects.slice(0, 10)) {
    const detail = (await (await fetch(`${BASE}/api/projects/${p.id}`, { headers: { cookie } })).json()) as { project: { stages: unknown[] } };
    if (detail.project.stages.length > most) {
      most = detail.project.stages.length;
      page = `/projects/${p.id}`;
    }
  }
  const stage = readFileSync(path.join(process.cwd(), 'tests/fixtures/stages/cc-12ax7-bypassed.json'), 'utf8');

  console.log(`[bench:api] ${BASE}, ${SECONDS} s per run, signed in as the designer; project page ${page} (${most} stages)`);
  const rows = [
    ...(await load('POST /api/analyze', { url: `${BASE}/api/analyze`, method: 'POST', headers: { cookie, 'content-type': 'application/json', origin: BASE }, body: stage })),
    ...(await load(`GET ${page}`, { url: `${BASE}${page}`, method: 'GET', headers: { cookie } })),
  ];
  console.log('\n| target | connections | req/s | p50 ms | p99 ms | non-2xx |');
  console.log('|---|---:|---:|---:|---:|---:|');
  for (const r of rows) console.log(`| ${r.target} | ${r.connections} | ${r.rps.toFixed(0)} | ${r.p50} | ${r.p99} | ${r.non2xx + r.errors} |`);
}

main().catch((err) => {
  console.error('[bench:api]', err);
  process.exit(1);
});
