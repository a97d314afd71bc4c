// Two app servers (two `next start` processes of the same production build) against one database: a session
// made on one works on the other and a sign-out on one ends it on both; simultaneous saves of one stage through
// the two servers give one 200 and one 409 with nothing lost; mail queued on either is sent exactly once although
// both servers drain the outbox.
import { spawn, type ChildProcess } from 'node:child_process';
import { expect, request, test, type APIRequestContext } from '@playwright/test';
import { DEMO_PASSWORD } from './support';

const portA = Number(process.env.E2E_PORT ?? 3100);
const portB = portA + 1;
const A = `http://localhost:${portA}`;
const B = `http://localhost:${portB}`;
let second: ChildProcess | null = null;

test.beforeAll(async () => {
  second = spawn(process.execPath, ['node_modules/next/dist/bin/next', 'start', '-p', String(portB)], { env: { ...process.env, PORT: String(portB) }, stdio: 'ignore' });
  const until = Date.now() + 60_000;
  for (;;) {
    const ok = await fetch(`${B}/sign-in`).then((r) => r.ok, () => false);
    if (ok) break;
    if (Date.now() > until) throw new Error('second server did not start');
    await new Promise((r) => setTimeout(r, 500));
  }
});

test.afterAll(async () => {
  if (second?.pid) process.kill(second.pid, 'SIGTERM');
});

async function signIn(ctx: APIRequestContext, base: string, email: string) {
  const { csrfToken } = (await (await ctx.get(`${base}/api/auth/csrf`)).json()) as { csrfToken: string };
  const res = await ctx.post(`${base}/api/auth/callback/credentials`, { form: { csrfToken, email, password: DEMO_PASSWORD, json: 'true' } });
  expect(res.status()).toBeLessThan(400);
}

async function signOut(ctx: APIRequestContext, base: string) {
  const { csrfToken } = (await (await ctx.get(`${base}/api/auth/csrf`)).json()) as { csrfToken: string };
  await ctx.post(`${base}/api/auth/signout`, { form: { csrfToken, json: 'true' } });
}

test('a session made on one server works on the other; signing out on either ends it on both', async () => {
  const ctx = await request.newContext();
  await signIn(ctx, A, 'designer@anodyne.test');
  // cookies belong to the host, not the port: the same browser talks to both servers
  const state = await ctx.storageState();
  const onB = await ctx.get(`${B}/api/me`);
  expect(onB.status()).toBe(200);
  expect((await onB.json()).user.email).toBe('designer@anodyne.test');

  await signOut(ctx, B);
  const replay = await request.newContext({ storageState: state });
  expect((await replay.get(`${A}/api/me`)).status()).toBe(401);
  expect((await replay.get(`${B}/api/me`)).status()).toBe(401);
});

test('simultaneous saves of one stage through the two servers: one 200, one 409, nothing lost', async () => {
  const ctx = await request.newContext();
  await signIn(ctx, A, 'designer@anodyne.test');
  const tubes = (await (await ctx.get(`${A}/api/tubes?search=12AX7`)).json()) as { tubes: { id: number; designation: string }[] };
  const tubeId = tubes.tubes.find((t) => t.designation === '12AX7')!.id;
  const project = (await (await ctx.post(`${A}/api/projects`, { data: { name: `Two servers ${Date.now()}` } })).json()).project;
  const stageRes = await ctx.post(`${B}/api/projects/${project.id}/stages`, {
    data: { name: 'V1a', topology: 'common-cathode', tubeId, supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, drive: { amplitude: 0.5, frequency: 1000 } },
  });
  expect(stageRes.status()).toBe(201);
  let stage = (await stageRes.json()).stage as { id: number; version: number };

  for (let round = 0; round < 10; round++) {
    const values = [`${200 + round}k`, `${300 + round}k`];
    const [ra, rb] = await Promise.all([
      ctx.patch(`${A}/api/stages/${stage.id}`, { data: { version: stage.version, inputs: { plateResistor: values[0] } } }),
      ctx.patch(`${B}/api/stages/${stage.id}`, { data: { version: stage.version, inputs: { plateResistor: values[1] } } }),
    ]);
    expect([ra.status(), rb.status()].sort()).toEqual([200, 409]);
    const winner = (ra.status() === 200 ? await ra.json() : await rb.json()).stage;
    const readA = (await (await ctx.get(`${A}/api/stages/${stage.id}`)).json()).stage;
    const readB = (await (await ctx.get(`${B}/api/stages/${stage.id}`)).json()).stage;
    expect(readA.version).toBe(stage.version + 1);
    expect(readA.inputs.plateResistor).toBe(winner.inputs.plateResistor);
    expect(readB).toEqual(readA);
    stage = readA;
  }
});

test('mail queued through either server is sent exactly once while both drain the outbox', async () => {
  const ctx = await request.newContext();
  await signIn(ctx, A, 'admin@anodyne.test');
  const tag = `scale-${Date.now()}`;
  const emails = Array.from({ length: 8 }, (_, i) => `${tag}-${i}@anodyne.test`);
  await Promise.all(
    emails.map(async (email, i) => {
      const res = await ctx.post(`${i % 2 ? B : A}/api/admin/invitations`, { data: { email, displayName: `Scale ${i}`, role: 'designer' } });
      expect(res.status()).toBe(201);
    }),
  );
  const sink = process.env.MAIL_SINK_URL ?? 'http://127.0.0.1:2580';
  const count = async () => {
    const { messages } = (await (await fetch(`${sink}/messages`)).json()) as { messages: { to: string[] }[] };
    return emails.map((e) => messages.filter((m) => m.to.some((t) => t.includes(e))).length);
  };
  await expect.poll(async () => (await count()).every((n) => n >= 1), { timeout: 30_000 }).toBe(true);
  // several more outbox rounds of both servers: nothing is sent again
  await new Promise((r) => setTimeout(r, Number(process.env.OUTBOX_INTERVAL_MS ?? 3000) * 3));
  expect(await count()).toEqual(emails.map(() => 1));
});
