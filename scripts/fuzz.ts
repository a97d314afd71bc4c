// Hostile-input fuzz of a running Anodyne server (loopback only): every route, every role, malformed ids, NUL
// characters and unpaired surrogates, wrong content types, huge numbers, missing and extra fields, oversized bodies.
// Prints the status counts and every 5xx with the request that caused it; exits 1 on any 5xx or lost connection.
//
//   npm run fuzz                       # builds if needed, starts a production server on a fresh database, 12,000 requests
//   tsx scripts/fuzz.ts --base http://127.0.0.1:3100 --requests 2000 --max-seconds 55 --report reports/checks/fuzz.json
//
// Options: --base URL (loopback host only), --requests N, --max-seconds S, --concurrency C, --seed N,
// --max-body BYTES (largest oversized body, default 12 MB), --report FILE (result for the npm test closing line).
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

// ---------- options ----------
function opt(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1]! : fallback;
}
const BASE = opt('base', process.env.FUZZ_BASE ?? process.env.BASE_URL ?? 'http://127.0.0.1:3000').replace(/\/$/, '');
const REQUESTS = Number(opt('requests', '10000'));
const MAX_SECONDS = Number(opt('max-seconds', '300'));
const CONCURRENCY = Number(opt('concurrency', '8'));
const SEED = Number(opt('seed', String(Date.now() % 1_000_000)));
const MAX_BODY = Number(opt('max-body', String(12 * 1024 * 1024)));
const REPORT = opt('report', '');
const PASSWORD = process.env.DEMO_PASSWORD ?? 'anodyne-demo';

const host = new URL(BASE).hostname;
if (!['127.0.0.1', 'localhost', '[::1]', '::1'].includes(host)) {
  console.error(`[fuzz] refusing to fuzz ${BASE}: loopback hosts only`);
  process.exit(2);
}

// ---------- deterministic randomness ----------
let state = SEED >>> 0 || 1;
function rand(): number {
  state = (state + 0x6d2b79f5) >>> 0;
  let t = state;
  t = Math.imul(t ^ (t >>> 15), t | 1);
  t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
}
const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rand() * xs.length)]!;
const chance = (p: number) => rand() < p;

// ---------- sessions ----------
type Role = 'anonymous' | 'admin' | 'designer' | 'reviewer' | 'technician';
const ROLES: Role[] = ['anonymous', 'admin', 'designer', 'reviewer', 'technician'];
const cookies: Record<Role, string> = { anonymous: '', admin: '', designer: '', reviewer: '', technician: '' };

function mergeCookies(jar: string, res: Response): string {
  const map = new Map(jar ? jar.split('; ').map((c) => [c.split('=')[0]!, c] as const) : []);
  for (const sc of res.headers.getSetCookie()) {
    const pair = sc.split(';')[0]!;
    map.set(pair.split('=')[0]!, pair);
  }
  return [...map.values()].join('; ');
}

async function signIn(role: Exclude<Role, 'anonymous'>): Promise<void> {
  const csrfRes = await fetch(`${BASE}/api/auth/csrf`);
  let jar = mergeCookies('', csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${BASE}/api/auth/callback/credentials`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: jar, origin: BASE },
    body: new URLSearchParams({ csrfToken, email: `${role}@anodyne.test`, password: PASSWORD, json: 'true' }),
    redirect: 'manual',
  });
  jar = mergeCookies(jar, res);
  const me = await fetch(`${BASE}/api/me`, { headers: { cookie: jar } });
  if (me.status !== 200) throw new Error(`sign-in as ${role} failed (${res.status}, /api/me ${me.status})`);
  cookies[role] = jar;
}

// ---------- real ids (read as the admin) ----------
type IdKind = 'project' | 'stage' | 'tube' | 'model' | 'curveSet' | 'revision' | 'benchCheck' | 'photo' | 'attachment' | 'user' | 'token' | 'run';
const ids: Record<IdKind, string[]> = { project: [], stage: [], tube: [], model: [], curveSet: [], revision: [], benchCheck: [], photo: [], attachment: [], user: [], token: [], run: [] };
const DEMO_USER_IDS = new Set<string>();

async function getJson<T>(url: string): Promise<T | null> {
  const res = await fetch(`${BASE}${url}`, { headers: { cookie: cookies.admin } });
  return res.ok ? ((await res.json()) as T) : null;
}

async function discover(): Promise<void> {
  const projects = (await getJson<{ projects: { id: number }[] }>('/api/projects?archived=all'))?.projects ?? [];
  ids.project = projects.slice(0, 6).map((p) => String(p.id));
  for (const p of ids.project.slice(0, 3)) {
    const detail = await getJson<{ project: { stages: { id: number }[] } }>(`/api/projects/${p}`);
    ids.stage.push(...(detail?.project.stages ?? []).map((s) => String(s.id)));
    const checks = (await getJson<{ checks: { id: number; photos?: { id: number }[] }[] }>(`/api/projects/${p}/bench-checks`))?.checks ?? [];
    ids.benchCheck.push(...checks.slice(0, 4).map((c) => String(c.id)));
    ids.photo.push(...checks.flatMap((c) => (c.photos ?? []).map((ph) => String(ph.id))));
  }
  const tubes = (await getJson<{ tubes: { id: number }[] }>('/api/tubes?pageSize=200'))?.tubes ?? [];
  ids.tube = tubes.slice(0, 8).map((t) => String(t.id));
  for (const t of ids.tube) {
    const detail = await getJson<{ tube: { models: { id: number }[]; curveSets: { id: number }[]; attachments: { id: number }[] } }>(`/api/tubes/${t}`);
    ids.model.push(...(detail?.tube.models ?? []).map((m) => String(m.id)));
    ids.curveSet.push(...(detail?.tube.curveSets ?? []).map((c) => String(c.id)));
    ids.attachment.push(...(detail?.tube.attachments ?? []).map((a) => String(a.id)));
  }
  ids.revision = ((await getJson<{ revisions: { id: number }[] }>('/api/revisions'))?.revisions ?? []).slice(0, 6).map((r) => String(r.id));
  const users = (await getJson<{ users: { id: number; email: string }[] }>('/api/admin/users'))?.users ?? [];
  ids.user = users.map((u) => String(u.id));
  for (const u of users) if (u.email.endsWith('@anodyne.test')) DEMO_USER_IDS.add(String(u.id));
  ids.token = ['x'.repeat(43)];
  ids.run = ((await getJson<{ runs: { id: number }[] }>('/api/explore/runs'))?.runs ?? []).slice(0, 4).map((r) => String(r.id));
  for (const k of Object.keys(ids) as IdKind[]) if (ids[k].length === 0) ids[k] = ['1'];
}

// ---------- hostile values ----------
const BAD_IDS = ['0', '-1', '2147483647', '2147483648', '9223372036854775808', '99999999999999999999999', '0x10', '+1', '1e3', '%201', '1%20', '1.5', '1.0', 'abc', '%00', '1%00', 'NaN', 'Infinity', '-0', '%EF%BC%91', '%D9%A1', '%ED%A0%80', '..%2F..%2Fetc', '1;DROP', "1'", '%F0%9F%94%A5', 'null', 'undefined', '[]', '00000000001'];
const BAD_QUERY_VALUES = ['', '%00', 'a%00b', '%ED%A0%80', '%ED%B0%80x', '-1', '0', '1e308', '-1e308', '2147483648', '0x10', '+1', ' 1', 'NaN', 'Infinity', '9'.repeat(400), 'x'.repeat(5000), '%25', '%27%3B--', '__proto__', 'constructor', '%5B%5D', 'true', 'all', '1k', '4k7', '100m', '-100m', '1,2,3,4', ',,', '1,1', '1,x'];
const NUL = '\u0000';
const LONE_HIGH = '\uD800';
const LONE_LOW = '\uDC00';
const HOSTILE_TEXT = [`a${NUL}b`, NUL, `x${LONE_HIGH}`, `${LONE_LOW}y`, LONE_HIGH, '', ' ', 'x'.repeat(70_000), '<script>alert(1)</script>', "'; DROP TABLE users; --", '\u202Eevil', '\uFEFF', '🔥'.repeat(50), 'ǅ'.repeat(10), '%s%n', '../../etc/passwd'];
const HOSTILE_NUMBERS: unknown[] = [1e308, -1e308, Number.MAX_SAFE_INTEGER + 2, -1, 0, 2147483648, 1e-320, '1e308', 'NaN', 'Infinity', '-Infinity', '0x10', ' 1', '+1', '1e3', '4k7', '22u', '2M2', 'abc', '', true, null, [], {}, [1, 2], { value: 1 }];
const ANY_JUNK: unknown[] = [...HOSTILE_NUMBERS, ...HOSTILE_TEXT.slice(0, 6), { __proto__: { admin: true } }, { constructor: { prototype: { x: 1 } } }];

/** JSON text nested n levels deep, written as text (a client-side stringify would overflow first). */
function deepJson(n: number): string {
  return chance(0.5) ? `${'['.repeat(n)}1${']'.repeat(n)}` : `${'{"a":'.repeat(n)}1${'}'.repeat(n)}`;
}

// ---------- valid base bodies ----------
const fixtureBody = (() => {
  try {
    const raw = JSON.parse(readFileSync(path.join(process.cwd(), 'tests/fixtures/stages/cc-12ax7-bypassed.json'), 'utf8')) as Record<string, unknown>;
    return raw;
  } catch {
    return { topology: 'common-cathode', supply: 300, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, drive: { amplitude: 1 } };
  }
})();
const inlineStage = () => structuredClone(fixtureBody);
const libraryStage = () => {
  const b = inlineStage();
  delete b.tube;
  return { ...b, tubeId: Number(pick(ids.tube)) };
};
const triodeModel = () => ({ kind: 'koren-triode', name: `Fuzz model ${Math.floor(rand() * 1e6)}`, parameters: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 } });

type BodyKind = 'json' | 'form' | 'multipart-csv' | 'multipart-pdf' | 'multipart-photo' | 'none';
interface Route {
  method: 'GET' | 'POST' | 'PATCH' | 'DELETE';
  path: string; // with {kind} placeholders
  query?: Record<string, () => string>;
  body?: () => unknown;
  bodyKind?: BodyKind;
  weight?: number;
  /** never send a body the schema could accept to these ids (protects the demo accounts the fuzz signs in with) */
  protectIds?: IdKind;
}

const q = {
  id: (k: IdKind) => () => pick(ids[k]),
  oneOf: (...xs: string[]) => () => pick(xs),
};
const ROUTES: Route[] = [
  // API reads
  { method: 'GET', path: '/api/me' },
  { method: 'GET', path: '/api/admin/users' },
  { method: 'GET', path: '/api/admin/outbox' },
  { method: 'GET', path: '/api/admin/mail-sink', weight: 0.3 },
  { method: 'GET', path: '/api/audit', query: { projectId: q.id('project'), userId: q.id('user'), action: q.oneOf('project.create', 'stage.update', 'auth.sign-in'), limit: q.oneOf('1', '50', '500') } },
  { method: 'GET', path: '/api/tubes', query: { search: q.oneOf('12AX7', 'el', '6L6', '%', '_'), family: q.oneOf('triode', 'pentode', 'beam-tetrode'), page: q.oneOf('1', '2'), pageSize: q.oneOf('5', '200'), includeRetired: q.oneOf('true', 'false', '1', '0') }, weight: 2 },
  { method: 'GET', path: '/api/tubes/options' },
  { method: 'GET', path: '/api/tubes/compare', query: { ids: () => `${pick(ids.tube)},${pick(ids.tube)}`, vaMax: q.oneOf('300', '1k') } },
  { method: 'GET', path: '/api/tubes/{tube}' },
  { method: 'GET', path: '/api/tubes/{tube}/plot', query: { modelId: q.id('model'), vaMax: q.oneOf('400', '1k'), screenVoltage: q.oneOf('250', '300') } },
  { method: 'GET', path: '/api/tubes/{tube}/curve-sets' },
  { method: 'GET', path: '/api/tubes/{tube}/models/{model}/spice' },
  { method: 'GET', path: '/api/curve-sets/{curveSet}' },
  { method: 'GET', path: '/api/curve-sets/{curveSet}/file' },
  { method: 'GET', path: '/api/attachments/{attachment}' },
  { method: 'GET', path: '/api/projects', query: { search: q.oneOf('amp', 'x'), status: q.oneOf('draft', 'approved', ''), archived: q.oneOf('true', 'false', 'all') }, weight: 2 },
  { method: 'GET', path: '/api/projects/{project}' },
  { method: 'GET', path: '/api/projects/{project}/chain', query: { input: q.oneOf('100m', '1', '0.5') } },
  { method: 'GET', path: '/api/projects/{project}/feedback', query: { input: q.oneOf('100m', '1'), resistor: q.oneOf('4k7', '10k'), shuntResistor: q.oneOf('470', '1k'), capacitor: q.oneOf('none', '1n', '100p') } },
  { method: 'GET', path: '/api/projects/{project}/revisions' },
  { method: 'GET', path: '/api/projects/{project}/bench-checks', query: { failing: q.oneOf('1', 'true', '0'), verdict: q.oneOf('pass', 'check', 'fail'), stageId: q.id('stage'), limit: q.oneOf('1', '200') } },
  { method: 'GET', path: '/api/projects/{project}/report', weight: 0.15 },
  { method: 'GET', path: '/api/stages/{stage}' },
  { method: 'GET', path: '/api/stages/{stage}/curves', query: { kind: q.oneOf('plate', 'transfer', 'response', 'waveform') } },
  { method: 'GET', path: '/api/stages/{stage}/bench-checks', query: { failing: q.oneOf('1', 'false'), limit: q.oneOf('5', '500') } },
  { method: 'GET', path: '/api/bench-checks/{benchCheck}' },
  { method: 'GET', path: '/api/bench-checks/{benchCheck}/photos/{photo}' },
  { method: 'GET', path: '/api/revisions', query: { state: q.oneOf('submitted', 'approved', 'changes-requested'), projectId: q.id('project') } },
  { method: 'GET', path: '/api/revisions/{revision}', query: { compare: q.oneOf('1', '2') } },
  { method: 'GET', path: '/api/explore/runs', query: { stageId: q.id('stage'), projectId: q.id('project'), kind: q.oneOf('tolerance', 'swap', 'search') } },
  { method: 'GET', path: '/api/explore/runs/{run}' },
  { method: 'POST', path: '/api/explore/runs', body: () => ({ kind: 'swap', target: { stageId: Number(pick(ids.stage)) } }), weight: 0.5 },
  { method: 'GET', path: '/api/revisions/{revision}/report', weight: 0.15 },
  { method: 'GET', path: '/api/invitations/{token}' },
  { method: 'GET', path: '/api/auth/session', weight: 0.3 },
  { method: 'GET', path: '/api/auth/csrf', weight: 0.2 },
  { method: 'GET', path: '/api/auth/providers', weight: 0.2 },
  // sign-in with hostile fields and no valid CSRF token: refused before any password check, so the fuzz never
  // counts towards the sign-in throttle of the demo accounts it uses
  { method: 'POST', path: '/api/auth/callback/credentials', bodyKind: 'form', weight: 0.3 },
  // API writes
  { method: 'POST', path: '/api/analyze', body: () => (chance(0.5) ? inlineStage() : { ...libraryStage(), tubeModelId: Number(pick(ids.model)) }), weight: 3 },
  { method: 'POST', path: '/api/projects', body: () => ({ name: `Fuzz ${Math.floor(rand() * 1e6)}`, description: 'made by the fuzz', supply: { rawVoltage: 350, sourceResistance: 50, nodes: [{ key: 'B+1', name: 'Reservoir', droppingResistor: 0, filterCapacitor: '47u' }], heaters: [] } }), weight: 2 },
  { method: 'PATCH', path: '/api/projects/{project}', body: () => ({ version: Math.floor(rand() * 4) + 1, name: `Renamed ${Math.floor(rand() * 1e4)}`, benchTolerances: { plateVoltage: 0.05 }, watchers: [Number(pick(ids.user))] }), weight: 2 },
  { method: 'DELETE', path: '/api/projects/{project}', weight: 0.2 },
  { method: 'POST', path: '/api/projects/{project}/stages', body: () => ({ ...libraryStage(), name: `Fuzz stage ${Math.floor(rand() * 1e4)}`, supplyNode: null }), weight: 2 },
  { method: 'PATCH', path: '/api/stages/{stage}', body: () => ({ version: Math.floor(rand() * 4) + 1, name: 'Renamed stage', inputs: { supply: 250 + Math.floor(rand() * 100) } }), weight: 2 },
  { method: 'DELETE', path: '/api/stages/{stage}', query: { version: q.oneOf('1', '2', '999') }, weight: 0.3 },
  { method: 'POST', path: '/api/stages/{stage}/bench-checks', body: () => ({ supplyVoltage: 330, plateVoltage: 220, cathodeVoltage: 1.6, measuredCurrent: '1.1m', tubeSerial: 'F-1', notes: 'fuzz' }), weight: 2 },
  { method: 'POST', path: '/api/bench-checks/{benchCheck}/photos', bodyKind: 'multipart-photo' },
  { method: 'POST', path: '/api/projects/{project}/revisions', body: () => ({ note: 'fuzz submission' }) },
  { method: 'DELETE', path: '/api/revisions/{revision}', weight: 0.3 },
  { method: 'POST', path: '/api/revisions/{revision}/decision', body: () => ({ decision: pick(['approve', 'request-changes']), comment: 'Looks fine to the fuzz.' }) },
  { method: 'POST', path: '/api/tubes', body: () => ({ designation: `FZ${Math.floor(rand() * 1e6)}`, family: 'triode', sections: 2, model: triodeModel() }) },
  { method: 'PATCH', path: '/api/tubes/{tube}', body: () => ({ notes: 'edited by the fuzz', aliases: ['FZ-1'] }) },
  { method: 'POST', path: '/api/tubes/{tube}/models', body: triodeModel },
  { method: 'PATCH', path: '/api/tubes/{tube}/models/{model}', body: () => ({ name: 'Renamed model', source: 'fuzz' }) },
  { method: 'POST', path: '/api/tubes/{tube}/curve-sets', bodyKind: 'multipart-csv' },
  { method: 'POST', path: '/api/tubes/{tube}/attachments', bodyKind: 'multipart-pdf' },
  { method: 'POST', path: '/api/curve-sets/{curveSet}/fit', body: () => ({ model: pick(['koren-triode', 'koren-pentode']) }), weight: 0.5 },
  { method: 'POST', path: '/api/curve-sets/{curveSet}/accept', body: () => ({ name: 'Fuzz fit', setDefault: false }) },
  { method: 'POST', path: '/api/curve-sets/{curveSet}/discard', body: () => ({}) },
  { method: 'POST', path: '/api/admin/invitations', body: () => ({ email: `fuzz${Math.floor(rand() * 1e9)}@example.invalid`, displayName: 'Fuzz Person', role: pick(['designer', 'reviewer', 'technician']) }) },
  { method: 'PATCH', path: '/api/admin/users/{user}', body: () => ({ displayName: 'Renamed by fuzz' }), protectIds: 'user' },
  { method: 'POST', path: '/api/invitations/accept', body: () => ({ token: 'x'.repeat(43), password: 'a-long-password-1', confirm: 'a-long-password-1' }) },
  // pages (HTML)
  { method: 'GET', path: '/' },
  { method: 'GET', path: '/projects' },
  { method: 'GET', path: '/projects/{project}' },
  { method: 'GET', path: '/projects/{project}/stages/{stage}' },
  { method: 'GET', path: '/projects/{project}/stages/new' },
  { method: 'GET', path: '/projects/{project}/explore' },
  { method: 'GET', path: '/projects/{project}/stages/{stage}/explore' },
  { method: 'GET', path: '/tubes' },
  { method: 'GET', path: '/tubes/{tube}' },
  { method: 'GET', path: '/tubes/{tube}/edit' },
  { method: 'GET', path: '/tubes/compare', query: { ids: () => `${pick(ids.tube)},${pick(ids.tube)}` } },
  { method: 'GET', path: '/bench', query: { stage: q.id('stage') } },
  { method: 'GET', path: '/reviews' },
  { method: 'GET', path: '/reviews/{revision}' },
  { method: 'GET', path: '/admin/users' },
  { method: 'GET', path: '/admin/outbox' },
  { method: 'GET', path: '/admin/audit', query: { projectId: q.id('project'), userId: q.id('user'), action: q.oneOf('project.create') } },
  { method: 'GET', path: '/invitations/{token}' },
  { method: 'GET', path: '/sign-in', weight: 0.3 },
];

// ---------- request construction ----------
interface Req {
  route: Route;
  role: Role;
  method: string;
  url: string;
  headers: Record<string, string>;
  body?: string | Blob | FormData;
  describe: string;
}

function fillPath(route: Route): string {
  return route.path.replace(/\{(\w+)\}/g, (_, kind: IdKind) => {
    if (route.protectIds === kind) return pick(BAD_IDS);
    return chance(0.72) ? pick(ids[kind]) : pick(BAD_IDS);
  });
}

function buildQuery(route: Route): string {
  const parts: string[] = [];
  for (const [name, valid] of Object.entries(route.query ?? {})) {
    if (chance(0.35)) continue;
    parts.push(`${name}=${chance(0.55) ? encodeURIComponent(valid()) : pick(BAD_QUERY_VALUES)}`);
    if (chance(0.05)) parts.push(`${name}=${pick(BAD_QUERY_VALUES)}`); // repeated parameter
  }
  if (chance(0.08)) parts.push(`${pick(['x', '__proto__', 'constructor', 'id', '%00'])}=${pick(BAD_QUERY_VALUES)}`);
  return parts.length ? `?${parts.join('&')}` : '';
}

/** Replaces, removes or adds one field somewhere in a JSON value. */
function mutate(value: unknown, depth = 0): unknown {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'string') return chance(0.6) ? pick(HOSTILE_TEXT) : pick(ANY_JUNK);
    if (typeof value === 'number') return pick(HOSTILE_NUMBERS);
    return pick(ANY_JUNK);
  }
  if (Array.isArray(value)) {
    if (value.length === 0 || chance(0.2)) return chance(0.5) ? [] : Array.from({ length: 2000 }, () => pick(ANY_JUNK));
    const copy = [...value];
    const i = Math.floor(rand() * copy.length);
    copy[i] = mutate(copy[i], depth + 1);
    return copy;
  }
  const obj = { ...(value as Record<string, unknown>) };
  const keys = Object.keys(obj);
  const r = rand();
  if (keys.length === 0 || r < 0.12) obj[pick(['extra', 'id', 'role', 'createdById', 'version', '__proto__', 'state', 'approved'])] = pick(ANY_JUNK);
  else if (r < 0.3) delete obj[pick(keys)];
  else {
    const k = pick(keys);
    obj[k] = depth < 3 && chance(0.4) && obj[k] && typeof obj[k] === 'object' ? mutate(obj[k], depth + 1) : mutate(obj[k], depth + 1);
  }
  return obj;
}

const CSV_GOOD = 'plate_voltage_V,grid_voltage_V,plate_current_mA\n100,0,1.2\n150,0,2.3\n200,-1,1.9\n250,-2,1.2\n';
function multipart(kind: BodyKind): FormData {
  const form = new FormData();
  const r = rand();
  const junk = new Uint8Array(Math.floor(rand() * 4096)).map(() => Math.floor(rand() * 256));
  if (kind === 'multipart-csv') {
    const text = r < 0.4 ? CSV_GOOD : r < 0.6 ? `a,b\n${NUL},${LONE_HIGH}\n` : r < 0.8 ? CSV_GOOD.replace('1.2', '1e308') : '';
    form.set('file', new Blob([r < 0.9 ? text : junk], { type: 'text/csv' }), pick(['curves.csv', `x${NUL}.csv`, '../../x.csv', 'a'.repeat(300)]));
    form.set('currentUnit', pick(['mA', 'A', 'kA', '', NUL]));
    if (chance(0.5)) form.set('name', pick(HOSTILE_TEXT).slice(0, 500));
  } else if (kind === 'multipart-pdf') {
    const bytes = r < 0.5 ? new TextEncoder().encode('%PDF-1.4\n%fuzz\n1 0 obj<<>>endobj\ntrailer<<>>\n%%EOF\n') : junk;
    form.set('file', new Blob([bytes], { type: pick(['application/pdf', 'text/plain', '']) }), pick(['sheet.pdf', 'x.exe', `${LONE_HIGH}.pdf`]));
    if (chance(0.5)) form.set('kind', pick(['datasheet', 'application-note', 'other', NUL, '']));
  } else {
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, ...junk.slice(0, 64)]);
    form.set(chance(0.9) ? 'file' : 'photo', new Blob([r < 0.6 ? png : junk], { type: pick(['image/png', 'image/jpeg', 'image/webp', 'image/svg+xml', 'text/html']) }), pick(['build.png', 'x.svg', `${NUL}.jpg`]));
  }
  return form;
}

function buildRequest(): Req {
  const totalWeight = ROUTES.reduce((s, r) => s + (r.weight ?? 1), 0);
  let x = rand() * totalWeight;
  let route = ROUTES[0]!;
  for (const r of ROUTES) {
    x -= r.weight ?? 1;
    if (x <= 0) {
      route = r;
      break;
    }
  }
  const role = pick(ROLES);
  const url = `${BASE}${fillPath(route)}${buildQuery(route)}`;
  const headers: Record<string, string> = { origin: BASE };
  if (cookies[role]) headers.cookie = cookies[role];
  let body: Req['body'];
  let describe = '';
  if (route.method === 'POST' || route.method === 'PATCH' || (route.method === 'DELETE' && chance(0.2))) {
    const r = rand();
    const kind = route.bodyKind ?? (route.body ? 'json' : 'none');
    const base = route.body?.() ?? {};
    const protect = route.protectIds !== undefined;
    if (kind === 'form' && r < 0.75) {
      const field = () => (chance(0.5) ? pick(HOSTILE_TEXT).slice(0, 2000) : `fuzz${Math.floor(rand() * 1e6)}@example.invalid`);
      body = new URLSearchParams({ csrfToken: pick(['', 'x', NUL, LONE_HIGH]), email: field(), password: field(), json: 'true' }).toString();
      headers['content-type'] = 'application/x-www-form-urlencoded';
      describe = 'sign-in form';
    } else if (kind.startsWith('multipart') && r < 0.75) {
      body = multipart(kind);
      describe = `multipart (${kind})`;
    } else if (r < (protect ? 0 : 0.3)) {
      body = JSON.stringify(base);
      headers['content-type'] = 'application/json';
      describe = 'valid JSON';
    } else if (r < 0.72) {
      let v: unknown = base;
      const n = 1 + Math.floor(rand() * 3);
      for (let i = 0; i < n; i++) v = mutate(v);
      body = JSON.stringify(v);
      headers['content-type'] = pick(['application/json', 'application/json', 'application/json; charset=utf-8', 'application/JSON']);
      describe = `mutated JSON (${n})`;
    } else if (r < 0.8) {
      body = pick(['{', '{"a":', '[', 'null', '"x"', '1', 'true', '{"name":"\\ud800"}', '{"name":"a\\u0000b"}', '{"__proto__":{"x":1}}', '\uFEFF{}', '{}{}', '{"a":1,"a":2}', '']);
      headers['content-type'] = 'application/json';
      describe = 'malformed JSON';
    } else if (r < 0.9) {
      body = pick([JSON.stringify(base), 'name=x&version=1', '<x/>', String(base)]);
      const ct = pick(['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data', 'multipart/form-data; boundary=zz', 'application/xml', 'application/octet-stream', '', 'application/json-patch+json']);
      if (ct) headers['content-type'] = ct;
      describe = `wrong content type (${ct || 'none'})`;
    } else if (r < 0.95) {
      body = chance(0.5) ? deepJson(pick([100, 5000, 100_000])) : JSON.stringify({ ...(base as object), filler: Array.from({ length: 50_000 }, (_, i) => i) });
      headers['content-type'] = 'application/json';
      describe = 'deeply nested / large JSON';
    } else if (r < 0.985) {
      body = new Blob([new Uint8Array(Array.from({ length: 2048 }, () => Math.floor(rand() * 256)))]);
      headers['content-type'] = pick(['application/json', 'multipart/form-data; boundary=zz']);
      describe = 'random bytes';
    } else {
      const size = Math.min(MAX_BODY, pick([2, 6, 12]) * 1024 * 1024);
      body = `{"name":"${'x'.repeat(size)}"}`;
      headers['content-type'] = 'application/json';
      describe = `oversized JSON (${(size / 1048576).toFixed(0)} MB)`;
    }
  }
  return { route, role, method: route.method, url, headers, body, describe };
}

// ---------- run ----------
interface Finding {
  status: number | string;
  role: Role;
  method: string;
  url: string;
  describe: string;
  body: string;
  answer: string;
}
const statusCounts = new Map<string, number>();
const perRoute = new Map<string, { total: number; bad: number; ms: number; maxMs: number }>();
const findings: Finding[] = [];

function excerpt(body: Req['body']): string {
  if (body === undefined) return '';
  if (typeof body === 'string') return body.length > 300 ? `${body.slice(0, 300)}… (${body.length} chars)` : body;
  if (body instanceof Blob) return `<${body.size} bytes>`;
  return `<multipart: ${[...body.keys()].join(', ')}>`;
}

async function send(req: Req): Promise<void> {
  const key = `${req.method} ${req.route.path}`;
  const entry = perRoute.get(key) ?? { total: 0, bad: 0, ms: 0, maxMs: 0 };
  const started = performance.now();
  entry.total += 1;
  perRoute.set(key, entry);
  let status: number | string = 'connection-error';
  let answer = '';
  // a connection the server closed while the client reused it (e.g. after refusing an oversized body) is retried
  // once on a fresh connection; a second failure is a finding
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const res = await fetch(req.url, { method: req.method, headers: req.headers, body: req.body, redirect: 'manual', signal: AbortSignal.timeout(30_000) });
      status = res.status;
      const text = await res.text().catch(() => '');
      if (status >= 500) answer = text.slice(0, 300);
      if (attempt) statusCounts.set('reset, retried', (statusCounts.get('reset, retried') ?? 0) + 1);
      break;
    } catch (err) {
      const cause = err instanceof Error ? (err.cause as { code?: string } | undefined)?.code : undefined;
      status = err instanceof Error && err.name === 'TimeoutError' ? 'timeout' : 'connection-error';
      answer = err instanceof Error ? `${err.name}: ${err.message}${cause ? ` (${cause})` : ''}` : String(err);
      if (status === 'timeout') break;
    }
  }
  const took = performance.now() - started;
  entry.ms += took;
  entry.maxMs = Math.max(entry.maxMs, took);
  const bucket = typeof status === 'number' ? String(status) : status;
  statusCounts.set(bucket, (statusCounts.get(bucket) ?? 0) + 1);
  if (typeof status !== 'number' || status >= 500) {
    entry.bad += 1;
    findings.push({ status, role: req.role, method: req.method, url: req.url, describe: req.describe, body: excerpt(req.body), answer });
  }
}

async function main(): Promise<void> {
  const t0 = Date.now();
  console.log(`[fuzz] ${BASE}: up to ${REQUESTS} requests in ${MAX_SECONDS} s, concurrency ${CONCURRENCY}, seed ${SEED}`);
  for (const role of ROLES) if (role !== 'anonymous') await signIn(role);
  await discover();
  console.log(`[fuzz] ids: ${(Object.keys(ids) as IdKind[]).map((k) => `${k} ${ids[k].length}`).join(', ')}`);
  const deadline = t0 + MAX_SECONDS * 1000;
  let sent = 0;
  async function worker(): Promise<void> {
    while (sent < REQUESTS && Date.now() < deadline) {
      sent += 1;
      if (sent % 1000 === 0) console.log(`[fuzz] ${sent} requests, ${((Date.now() - t0) / 1000).toFixed(0)} s, ${findings.length} problem answers so far`);
      await send(buildRequest());
    }
  }
  await Promise.all(Array.from({ length: CONCURRENCY }, worker));
  const seconds = (Date.now() - t0) / 1000;

  console.log(`\n[fuzz] ${sent} requests in ${seconds.toFixed(1)} s (${(sent / seconds).toFixed(0)}/s)`);
  console.log('[fuzz] status counts:');
  for (const [s, n] of [...statusCounts.entries()].sort()) console.log(`  ${s.padEnd(16)} ${n}`);
  console.log('[fuzz] slowest routes (mean / max ms):');
  for (const [k, v] of [...perRoute.entries()].sort((a, b) => b[1].ms / b[1].total - a[1].ms / a[1].total).slice(0, 8)) console.log(`  ${k.padEnd(52)} ${(v.ms / v.total).toFixed(0).padStart(6)} / ${v.maxMs.toFixed(0)}  (${v.total})`);
  const badRoutes = [...perRoute.entries()].filter(([, v]) => v.bad > 0);
  if (findings.length) {
    console.log(`\n[fuzz] ${findings.length} answers of 5xx or no answer, on ${badRoutes.length} routes:`);
    for (const [k, v] of badRoutes) console.log(`  ${k}: ${v.bad} of ${v.total}`);
    console.log('\n[fuzz] every such request:');
    for (const f of findings) console.log(`  ${f.status} ${f.method} ${f.url} as ${f.role} [${f.describe}] body=${JSON.stringify(f.body)} → ${JSON.stringify(f.answer)}`);
  } else {
    console.log(`[fuzz] no 5xx over ${perRoute.size} routes`);
  }
  const tooFew = sent < Math.min(REQUESTS, 2000);
  if (tooFew) console.log(`[fuzz] only ${sent} requests were sent before the time limit`);
  if (REPORT) {
    mkdirSync(path.dirname(REPORT), { recursive: true });
    const problems = [...badRoutes.map(([k, v]) => `${k}: ${v.bad} × 5xx/no answer of ${v.total}`), ...(tooFew ? [`only ${sent} requests sent`] : [])];
    writeFileSync(REPORT, JSON.stringify({ passed: perRoute.size - badRoutes.length, failed: badRoutes.length + (tooFew ? 1 : 0), problems, requests: sent, seconds, seed: SEED, statusCounts: Object.fromEntries(statusCounts), findings: findings.slice(0, 500) }, null, 2));
  }
  process.exit(findings.length || tooFew ? 1 : 0);
}

main().catch((err) => {
  console.error('[fuzz] could not run:', err);
  if (REPORT) {
    mkdirSync(path.dirname(REPORT), { recursive: true });
    writeFileSync(REPORT, JSON.stringify({ passed: 0, failed: 1, problems: [`fuzz could not run: ${String(err)}`] }));
  }
  process.exit(1);
});
