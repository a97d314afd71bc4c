// JavaScript sent per page, gzipped, against the 250 kB target: signs in as each role against a production server
// (BASE_URL, started by scripts/with-prod-server.sh), loads every screen in Chromium and sums the gzipped size of
// every script the page fetched (first load, nothing cached), then prints one row per page.
//   npm run bench:pages
import { gzipSync } from 'node:zlib';
import { chromium, type Page } from 'playwright-core';

const BASE = process.env.BASE_URL ?? 'http://127.0.0.1:3300';
const TARGET_KB = 250;

async function signIn(page: Page, role: string) {
  await page.goto(`${BASE}/sign-in`);
  await page.getByLabel('E-mail').fill(`${role}@anodyne.test`);
  await page.getByLabel('Password').fill(process.env.DEMO_PASSWORD ?? 'anodyne-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('user-name').waitFor();
}

async function firstHref(page: Page, path: string, selector: string) {
  await page.goto(`${BASE}${path}`);
  const a = page.locator(selector).first();
  return (await a.count()) ? a.getAttribute('href') : null;
}

async function main() {
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-dev-shm-usage', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
  });
  const rows: { page: string; kB: number; files: number }[] = [];
  async function measure(role: string, path: string, label = path) {
    const ctx = await browser.newContext();
    const page = await ctx.newPage();
    await signIn(page, role);
    // a fresh context per measurement: nothing from the sign-in page is cached for the measured page
    const measured = await browser.newContext({ storageState: await ctx.storageState() });
    await ctx.close();
    const p = await measured.newPage();
    const scripts = new Map<string, number>();
    p.on('response', async (res) => {
      if (res.request().resourceType() !== 'script' || scripts.has(res.url())) return;
      try {
        scripts.set(res.url(), gzipSync(await res.body()).length);
      } catch {
        /* a redirect or an aborted request has no body */
      }
    });
    await p.goto(`${BASE}${path}`, { waitUntil: 'networkidle' });
    await p.waitForTimeout(500);
    const bytes = [...scripts.values()].reduce((a, b) => a + b, 0);
    rows.push({ page: label, kB: bytes / 1024, files: scripts.size });
    await measured.close();
  }

  const probe = await browser.newContext();
  const pp = await probe.newPage();
  await signIn(pp, 'designer');
  const project = await firstHref(pp, '/projects', 'a[href^="/projects/"]');
  const stage = project ? await firstHref(pp, project, 'a[href*="/stages/"]:not([href$="/new"])') : null;
  const tube = await firstHref(pp, '/tubes', 'a[href^="/tubes/"]:not([href$="/compare"]):not([href$="/new"])');
  await probe.close();

  for (const [role, path, label] of [
    ['designer', '/', 'home (designer)'],
    ['designer', '/projects', '/projects'],
    ['designer', project, '/projects/{id}'],
    ['designer', stage, '/projects/{id}/stages/{id}'],
    ['designer', project ? `${project}/stages/new` : null, '/projects/{id}/stages/new'],
    ['designer', '/tubes', '/tubes'],
    ['designer', tube, '/tubes/{id}'],
    ['designer', '/tubes/compare', '/tubes/compare'],
    ['technician', '/bench', '/bench'],
    ['reviewer', '/reviews', '/reviews'],
    ['admin', '/admin/users', '/admin/users'],
    ['admin', '/admin/audit', '/admin/audit'],
    ['admin', '/admin/outbox', '/admin/outbox'],
  ] as const) {
    if (path) await measure(role, path, label);
  }
  await browser.close();

  console.log(`JavaScript per page, gzipped (target ≤ ${TARGET_KB} kB)`);
  console.log('page'.padEnd(30), 'kB gz'.padStart(8), 'files'.padStart(6), '  vs target');
  for (const r of rows) console.log(r.page.padEnd(30), r.kB.toFixed(1).padStart(8), String(r.files).padStart(6), `  ${r.kB <= TARGET_KB ? 'within' : 'OVER'} (${((r.kB / TARGET_KB) * 100).toFixed(0)} %)`);
  const worst = rows.reduce((a, b) => (b.kB > a.kB ? b : a), rows[0]!);
  console.log(`largest: ${worst.page} ${worst.kB.toFixed(1)} kB gz (${worst.kB <= TARGET_KB ? 'within' : 'over'} the ${TARGET_KB} kB target)`);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
