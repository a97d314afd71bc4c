import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { apiAs } from './support';

// Production smoke: every GET route and page, with each documented query parameter, as each role and signed out.
// Run against `next start` of the production build (npm test starts it and also scans its log for unhandled
// errors). A 5xx anywhere fails; any other status is the route's own business (401/403/404/422 are fine).

type Role = 'anonymous' | 'admin' | 'designer' | 'reviewer' | 'technician';
const ROLES: Role[] = ['anonymous', 'admin', 'designer', 'reviewer', 'technician'];

const session = (role: Role): Promise<APIRequestContext> => apiAs(role);

async function json<T>(ctx: APIRequestContext, url: string): Promise<T> {
  const res = await ctx.get(url);
  expect(res.status(), `GET ${url}`).toBe(200);
  return (await res.json()) as T;
}

type Ids = {
  projectId: number;
  stageId: number;
  tubeIds: number[];
  modelId: number;
  curveSetId: number | null;
  attachmentId: number | null;
  revisionId: number | null;
  benchCheckId: number | null;
  photoId: number | null;
};

/** Real ids from the seeded demo, read through the API as the admin (missing kinds fall back to a fresh one). */
async function discoverIds(admin: APIRequestContext): Promise<Ids> {
  const { projects } = await json<{ projects: { id: number }[] }>(admin, '/api/projects');
  let projectId = projects[0]?.id;
  if (!projectId) {
    const res = await admin.post('/api/projects', { data: { name: `Smoke project ${Date.now()}` } });
    projectId = ((await res.json()) as { project: { id: number } }).project.id;
  }
  const { project } = await json<{ project: { stages: { id: number }[] } }>(admin, `/api/projects/${projectId}`);
  const { tubes } = await json<{ tubes: { id: number }[] }>(admin, '/api/tubes');
  const tubeIds = tubes.map((t) => t.id);
  const { tube } = await json<{ tube: { models: { id: number }[]; curveSets?: { id: number }[]; attachments?: { id: number }[] } }>(admin, `/api/tubes/${tubeIds[0]}`);
  const withCurves = await (async () => {
    for (const id of tubeIds) {
      const t = (await json<{ tube: { curveSets?: { id: number }[]; attachments?: { id: number }[] } }>(admin, `/api/tubes/${id}`)).tube;
      if (t.curveSets?.length || t.attachments?.length) return t;
    }
    return null;
  })();
  const { revisions } = await json<{ revisions: { id: number }[] }>(admin, '/api/revisions');
  const { checks } = await json<{ checks: { id: number; photos?: { id: number }[] }[] }>(admin, `/api/projects/${projectId}/bench-checks`);
  const withPhoto = checks.find((c) => c.photos?.length);
  const benchCheckId = withPhoto?.id ?? checks[0]?.id ?? null;
  const photoId = withPhoto?.photos?.[0]?.id ?? null;
  return {
    projectId,
    stageId: project.stages[0]?.id ?? 1,
    tubeIds,
    modelId: tube.models[0]?.id ?? 1,
    curveSetId: withCurves?.curveSets?.[0]?.id ?? null,
    attachmentId: withCurves?.attachments?.[0]?.id ?? null,
    revisionId: revisions[0]?.id ?? null,
    benchCheckId,
    photoId,
  };
}

/** Every GET route (app/api/**\/route.ts) and page (app/**\/page.tsx) with each documented query parameter. */
function urls(ids: Ids): string[] {
  const p = ids.projectId;
  const s = ids.stageId;
  const t = ids.tubeIds[0]!;
  const m = ids.modelId;
  const cs = ids.curveSetId ?? 999_999;
  const rev = ids.revisionId ?? 999_999;
  const bc = ids.benchCheckId ?? 999_999;
  const two = ids.tubeIds.slice(0, 2).join(',');
  const three = ids.tubeIds.slice(0, 3).join(',');
  return [
    // API
    '/api/me',
    '/api/admin/users',
    '/api/admin/outbox',
    '/api/admin/mail-sink',
    '/api/audit',
    `/api/audit?projectId=${p}`,
    '/api/audit?userId=1',
    '/api/audit?action=project.create',
    '/api/audit?limit=5',
    '/api/tubes',
    '/api/tubes?search=12AX7',
    '/api/tubes?search=el34',
    '/api/tubes?search=%25_%27',
    '/api/tubes?family=triode',
    '/api/tubes?family=pentode',
    '/api/tubes?page=2&pageSize=5',
    '/api/tubes?includeRetired=true',
    '/api/tubes?search=6L6&family=beam-tetrode&includeRetired=1&page=1&pageSize=200',
    '/api/tubes/options',
    `/api/tubes/compare?ids=${two}`,
    `/api/tubes/compare?ids=${three}&vaMax=400`,
    `/api/tubes/${t}`,
    `/api/tubes/${t}/plot`,
    `/api/tubes/${t}/plot?modelId=${m}&vaMax=500&screenVoltage=250`,
    `/api/tubes/${t}/plot?vaMax=1k`,
    `/api/tubes/${t}/curve-sets`,
    `/api/tubes/${t}/models/${m}/spice`,
    `/api/curve-sets/${cs}`,
    `/api/curve-sets/${cs}/file`,
    ids.attachmentId ? `/api/attachments/${ids.attachmentId}` : '/api/attachments/999999',
    '/api/projects',
    '/api/projects?search=amp',
    '/api/projects?status=draft',
    '/api/projects?status=',
    '/api/projects?archived=true',
    '/api/projects?search=%27%3B--&status=approved&archived=false',
    `/api/projects/${p}`,
    `/api/projects/${p}/chain`,
    `/api/projects/${p}/chain?input=100m`,
    `/api/projects/${p}/chain?input=1`,
    `/api/projects/${p}/feedback`,
    `/api/projects/${p}/feedback?input=100m&resistor=4k7&capacitor=none`,
    `/api/projects/${p}/feedback?input=0.5&resistor=10k&shuntResistor=470&capacitor=1n`,
    `/api/projects/${p}/revisions`,
    `/api/projects/${p}/bench-checks`,
    `/api/projects/${p}/bench-checks?failing=1`,
    `/api/projects/${p}/bench-checks?verdict=pass`,
    `/api/projects/${p}/bench-checks?stageId=${s}&limit=10`,
    `/api/projects/${p}/report`,
    `/api/stages/${s}`,
    `/api/stages/${s}/curves?kind=plate`,
    `/api/stages/${s}/curves?kind=transfer`,
    `/api/stages/${s}/curves?kind=response`,
    `/api/stages/${s}/curves?kind=waveform`,
    `/api/stages/${s}/bench-checks`,
    `/api/stages/${s}/bench-checks?failing=true&limit=5`,
    `/api/bench-checks/${bc}`,
    ids.photoId ? `/api/bench-checks/${bc}/photos/${ids.photoId}` : `/api/bench-checks/${bc}/photos/999999`,
    '/api/revisions',
    '/api/revisions?state=submitted',
    '/api/revisions?state=approved',
    '/api/revisions?state=changes-requested',
    `/api/revisions?projectId=${p}`,
    `/api/revisions/${rev}`,
    `/api/revisions/${rev}?compare=1`,
    `/api/revisions/${rev}/report`,
    '/api/explore/runs',
    `/api/explore/runs?stageId=${s}`,
    `/api/explore/runs?projectId=${p}&kind=tolerance`,
    '/api/explore/runs?kind=swap',
    '/api/explore/runs?kind=search',
    '/api/explore/runs/999999',
    '/api/invitations/not-a-real-token',
    '/api/auth/csrf',
    '/api/auth/session',
    '/api/auth/providers',
    // pages
    '/',
    '/sign-in',
    '/forbidden',
    '/invitations/not-a-real-token',
    '/projects',
    `/projects/${p}`,
    `/projects/${p}/stages/${s}`,
    `/projects/${p}/stages/new`,
    `/projects/${p}/explore`,
    `/projects/${p}/stages/${s}/explore`,
    '/tubes',
    '/tubes/new',
    `/tubes/${t}`,
    `/tubes/${t}/edit`,
    '/tubes/compare',
    `/tubes/compare?ids=${two}`,
    `/tubes/compare?ids=${three}`,
    '/bench',
    `/bench?stage=${s}`,
    '/reviews',
    `/reviews/${rev}`,
    '/admin/users',
    '/admin/outbox',
    '/admin/audit',
    `/admin/audit?projectId=${p}&userId=1&action=project.create`,
    '/favicon.ico',
    '/icon.svg',
    '/no-such-page',
  ];
}

/** Every GET route file and page in app/, as a pattern over request paths ([id] → one segment, (group) dropped). */
function appGetRoutes(): { file: string; pattern: RegExp }[] {
  const root = path.resolve(__dirname, '../../app');
  const out: { file: string; pattern: RegExp }[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const p = path.join(dir, name);
      if (statSync(p).isDirectory()) walk(p);
      else if ((name === 'route.ts' && /export const GET\b/.test(readFileSync(p, 'utf8'))) || name === 'page.tsx') {
        const segments = path.relative(root, dir).split(path.sep).filter((seg) => seg && !/^\(.*\)$/.test(seg));
        const body = segments.map((seg) => (seg.startsWith('[...') ? '.+' : seg.startsWith('[') ? '[^/]+' : seg.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'))).join('/');
        out.push({ file: path.relative(root, p), pattern: new RegExp(`^/${body}/?(\\?.*)?$`) });
      }
    }
  };
  walk(root);
  return out;
}

test('the smoke list covers every GET route and page in app/', () => {
  const fake: Ids = { projectId: 1, stageId: 1, tubeIds: [1, 2, 3], modelId: 1, curveSetId: 1, attachmentId: 1, revisionId: 1, benchCheckId: 1, photoId: 1 };
  const list = urls(fake);
  const routes = appGetRoutes();
  expect(routes.length).toBeGreaterThan(30);
  const missing = routes.filter((r) => !list.some((u) => r.pattern.test(u))).map((r) => r.file);
  expect(missing, 'GET routes or pages with no smoke request: add them to urls()').toEqual([]);
});

test.describe('production smoke: no 5xx on any GET', () => {
  let ids: Ids;

  test.beforeAll(async () => {
    const admin = await session('admin');
    ids = await discoverIds(admin);
    await admin.dispose();
  });

  for (const role of ROLES) {
    test(`${role}: every GET route and page answers below 500`, async () => {
      test.setTimeout(180_000);
      const ctx = await session(role);
      const failures: string[] = [];
      const list = urls(ids);
      for (const url of list) {
        const res = await ctx.get(url);
        if (res.status() >= 500) failures.push(`${res.status()} GET ${url}: ${(await res.text()).slice(0, 200)}`);
      }
      await ctx.dispose();
      expect(list.length).toBeGreaterThan(80);
      expect(failures, `5xx answers as ${role}`).toEqual([]);
    });
  }

  test('the app icon is served to signed-out visitors (no 404 on any page)', async () => {
    const ctx = await session('anonymous');
    for (const url of ['/favicon.ico', '/icon.svg']) {
      const res = await ctx.get(url);
      expect(res.status(), url).toBe(200);
    }
    await ctx.dispose();
  });
});
