// Report PDFs against a running production server: how long a 20-stage design report takes to draw, and how other
// requests fare meanwhile (the report is drawn in a worker thread, so they should not wait for it).
// Prints figures only: nothing here passes or fails on speed.
//
//   npm run bench:report                                  # own production server on a fresh database
//   BASE_URL=http://127.0.0.1:3100 tsx bench/report.bench.ts [--stages 20] [--connections 4]
import { performance } from 'node:perf_hooks';

function opt(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1]! : fallback;
}
const BASE = (process.env.BASE_URL ?? 'http://127.0.0.1:3000').replace(/\/$/, '');
const STAGES = Number(opt('stages', '20'));
const CONNECTIONS = Number(opt('connections', '4'));
const PASSWORD = process.env.DEMO_PASSWORD ?? 'anodyne-demo';

async function signIn(email: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) jar.set(c.split('=')[0]!, c.split(';')[0]!);
  };
  const csrf = await fetch(`${BASE}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${BASE}/api/auth/callback/credentials`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: [...jar.values()].join('; '), origin: BASE },
    body: new URLSearchParams({ csrfToken, email, password: PASSWORD, json: 'true' }),
    redirect: 'manual',
  });
  keep(res);
  return [...jar.values()].join('; ');
}

const pct = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * p))] ?? Number.NaN;

async function main() {
  const cookie = await signIn('designer@anodyne.test');
  const json = { cookie, origin: BASE, 'content-type': 'application/json' };
  const get = async (p: string) => {
    const r = await fetch(`${BASE}${p}`, { headers: { cookie } });
    if (!r.ok) throw new Error(`GET ${p}: ${r.status}`);
    return r;
  };

  // A project of STAGES copies of the first demo stage, made through the API as a designer would.
  const { projects } = (await (await get('/api/projects')).json()) as { projects: { id: number }[] };
  const demo = (await (await get(`/api/projects/${projects[0]!.id}`)).json()) as { project: { stages: { inputs: Record<string, unknown> }[] } };
  const inputs = demo.project.stages[0]!.inputs;
  const created = await fetch(`${BASE}/api/projects`, { method: 'POST', headers: json, body: JSON.stringify({ name: `Report bench ${Date.now()}`, description: 'bench/report.bench.ts' }) });
  if (created.status !== 201) throw new Error(`create project: ${created.status} ${await created.text()}`);
  const id = ((await created.json()) as { project: { id: number } }).project.id;
  for (let i = 1; i <= STAGES; i++) {
    const r = await fetch(`${BASE}/api/projects/${id}/stages`, { method: 'POST', headers: json, body: JSON.stringify({ ...inputs, name: `Stage ${i}` }) });
    if (r.status !== 201) throw new Error(`add stage ${i}: ${r.status} ${await r.text()}`);
  }

  await (await get(`/api/projects/${id}/report`)).arrayBuffer(); // starts the drawing thread

  // Baseline: the same light requests for a few seconds with no report being drawn.
  const base: number[] = [];
  const until = performance.now() + 5000;
  await Promise.all(
    Array.from({ length: CONNECTIONS }, async () => {
      while (performance.now() < until) {
        const a = performance.now();
        await (await get('/api/tubes?search=12AX7')).text();
        base.push(performance.now() - a);
      }
    }),
  );
  base.sort((a, b) => a - b);

  let done = false;
  const t0 = performance.now();
  const report = get(`/api/projects/${id}/report`).then(async (r) => {
    const size = (await r.arrayBuffer()).byteLength;
    done = true;
    return { ms: performance.now() - t0, size };
  });
  const light: number[] = [];
  await Promise.all(
    Array.from({ length: CONNECTIONS }, async () => {
      while (!done) {
        const a = performance.now();
        await (await get('/api/tubes?search=12AX7')).text();
        if (!done) light.push(performance.now() - a);
      }
    }),
  );
  const { ms, size } = await report;
  light.sort((a, b) => a - b);
  console.log(`${STAGES}-stage report: ${(ms / 1000).toFixed(1)} s, ${(size / 1024).toFixed(0)} KiB`);
  console.log(`no report: GET /api/tubes?search=12AX7 × ${base.length} at ${CONNECTIONS} connections: p50 ${pct(base, 0.5).toFixed(0)} ms, p99 ${pct(base, 0.99).toFixed(0)} ms`);
  console.log(
    `during the report: GET /api/tubes?search=12AX7 × ${light.length} at ${CONNECTIONS} connections: p50 ${pct(light, 0.5).toFixed(0)} ms, p99 ${pct(light, 0.99).toFixed(0)} ms, max ${light.at(-1)?.toFixed(0)} ms`,
  );
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
