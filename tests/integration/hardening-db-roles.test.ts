// Two database roles. The app connects as one that owns nothing and may only read and write rows: it cannot
// TRUNCATE, change tables or disable triggers. The review steps are enforced in SQL for every role: a revision
// changes state only from submitted, and only to what its decision says.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes, Sequelize } from 'sequelize';

const ownerUrl = new URL(process.env.MIGRATION_DATABASE_URL ?? process.env.DATABASE_URL!);
ownerUrl.username = 'anodyne';
ownerUrl.password = 'anodyne';
const appUrl = new URL(ownerUrl);
appUrl.username = process.env.APP_DB_USER ?? 'anodyne_app';
appUrl.password = process.env.APP_DB_PASSWORD ?? 'anodyne_app';

type Api = typeof import('../support/api');
type Handler = Parameters<Api['call']>[0];
let api: Api;
let r: Record<string, Handler>;
let app: Sequelize;
const owner = new Sequelize(ownerUrl.toString(), { logging: false });

beforeAll(async () => {
  // everything the routes do in this file runs as the app's role
  const { createSequelize } = await import('@/lib/db/sequelize');
  app = createSequelize(appUrl.toString());
  (globalThis as { anodyneSequelize?: unknown }).anodyneSequelize = app;
  api = await import('../support/api');
  r = {
    createProject: (await import('@/app/api/projects/route')).POST,
    addStage: (await import('@/app/api/projects/[id]/stages/route')).POST,
    submit: (await import('@/app/api/projects/[id]/revisions/route')).POST,
    decide: (await import('@/app/api/revisions/[id]/decision/route')).POST,
  };
});
afterAll(async () => {
  await owner.close();
});

async function refused(sql: string, s: Sequelize = app) {
  try {
    await s.query(sql);
  } catch (err) {
    return String((err as { parent?: { message?: string } }).parent?.message ?? err);
  }
  return null;
}

describe('the app database role', () => {
  it('owns nothing and is no superuser', async () => {
    const [row] = await app.query<{ owned: number; superuser: boolean; createdb: boolean; who: string }>(
      `SELECT current_user AS who, (SELECT count(*)::int FROM pg_class WHERE relowner = r.oid) AS owned, r.rolsuper AS superuser, r.rolcreatedb AS createdb
         FROM pg_roles r WHERE r.rolname = current_user`,
      { type: QueryTypes.SELECT },
    );
    expect(row).toEqual({ who: appUrl.username, owned: 0, superuser: false, createdb: false });
  });

  it('cannot truncate, alter tables, disable triggers or create tables', async () => {
    expect(await refused('TRUNCATE audit_events')).toMatch(/permission denied/);
    expect(await refused('ALTER TABLE revisions DISABLE TRIGGER ALL')).toMatch(/must be owner|permission denied/);
    expect(await refused('DROP TRIGGER revisions_guard ON revisions')).toMatch(/must be owner|permission denied/);
    expect(await refused('CREATE TABLE harden_probe (id int)')).toMatch(/permission denied/);
    expect(await refused("DELETE FROM schema_migrations WHERE name = 'x'")).toMatch(/permission denied/);
  });

  it('runs the design and review flow through the routes', async () => {
    const { TubeType } = await import('@/models');
    const tubeId = (await TubeType.findOne({ where: { designation: '12AX7' } }))!.id;
    const p = await api.call(r.createProject!, { as: 'designer', method: 'POST', body: { name: `Roles ${Date.now()}` } });
    expect(p.status, JSON.stringify(p.json)).toBe(201);
    const pid = String(p.json.project.id);
    const s = await api.call(r.addStage!, {
      as: 'designer', method: 'POST', params: { id: pid },
      body: { name: 'V1a', topology: 'common-cathode', tubeId, supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, drive: { amplitude: 0.5, frequency: 1000 } },
    });
    expect(s.status, JSON.stringify(s.json)).toBe(201);
    const rev = await api.call(r.submit!, { as: 'designer', method: 'POST', params: { id: pid } });
    expect(rev.status, rev.json?.error?.message).toBe(201);
    const d = await api.call(r.decide!, { as: 'reviewer', method: 'POST', params: { id: String(rev.json.revision.id) }, body: { decision: 'request-changes', comment: 'Bypass the cathode.' } });
    expect(d.status, d.json?.error?.message).toBe(201);

    // now the shortcut the review steps forbid, tried as the app and as the owner
    const id = rev.json.revision.id as number;
    for (const s of [app, owner]) {
      expect(await refused(`UPDATE revisions SET state = 'approved' WHERE id = ${id}`, s)).toMatch(/without the review decision/);
    }
  });

  it('a revision cannot be created decided, nor decided without its decision row', async () => {
    const [rev] = await owner.query<{ id: number; project_id: number }>(`SELECT id, project_id FROM revisions ORDER BY id DESC LIMIT 1`, { type: QueryTypes.SELECT });
    expect(
      await refused(
        `INSERT INTO revisions (project_id, number, snapshot, content_hash, state, submitted_by_id)
         VALUES (${rev!.project_id}, 9999, '{}', 'x', 'approved', NULL)`,
        owner,
      ),
    ).toMatch(/starts as submitted/);
    const t = await owner.transaction();
    try {
      const [fresh] = await owner.query<{ id: number }>(
        `INSERT INTO revisions (project_id, number, snapshot, content_hash, state, submitted_by_id)
         VALUES (${rev!.project_id}, 9998, '{}', 'y', 'submitted', NULL) RETURNING id`,
        { type: QueryTypes.SELECT, transaction: t },
      );
      const msg = await owner.query(`UPDATE revisions SET state = 'approved' WHERE id = ${fresh!.id}`, { transaction: t }).then(() => null, (e) => String(e.parent?.message ?? e));
      expect(msg).toMatch(/without the review decision/);
    } finally {
      await t.rollback();
    }
  });
});
