import { QueryTypes, Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrator } from '@/lib/db/migrator';
import { createSequelize } from '@/lib/db/sequelize';

// Runs every migration up, all the way down, and up again on an empty database of its own.
// the owner role: migrations create and drop tables (the app's role may not)
const base = process.env.MIGRATION_DATABASE_URL ?? process.env.DATABASE_URL!;
const dbName = `anodyne_migrations_${process.pid}`;
const adminUrl = base.replace(/\/[^/]+$/, '/postgres');
let admin: Sequelize;
let target: Sequelize;

async function tables(s: Sequelize) {
  const rows = await s.query<{ name: string }>(`SELECT tablename::text AS name FROM pg_tables WHERE schemaname = 'public' ORDER BY 1`, { type: QueryTypes.SELECT });
  return rows.map((r) => r.name).filter((t) => t !== 'schema_migrations');
}

beforeAll(async () => {
  admin = new Sequelize(adminUrl, { logging: false });
  await admin.query(`DROP DATABASE IF EXISTS ${dbName}`);
  await admin.query(`CREATE DATABASE ${dbName}`);
  target = createSequelize(base.replace(/\/[^/]+$/, `/${dbName}`));
});

afterAll(async () => {
  await target?.close();
  await admin.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
  await admin.close();
});

describe('migrations', () => {
  it('run up on an empty database, down to nothing, and up again', async () => {
    const m = migrator(target);
    const applied = await m.up();
    expect(applied.length).toBeGreaterThanOrEqual(4);
    const after = await tables(target);
    for (const t of ['users', 'invitations', 'audit_events', 'tube_types', 'tube_models', 'curve_sets', 'projects', 'stages', 'bench_checks', 'revisions', 'decisions', 'mail_outbox']) {
      expect(after).toContain(t);
    }
    const reverted = await m.down({ to: 0 });
    expect(reverted.length).toBe(applied.length);
    expect(await tables(target)).toEqual([]);
    const [fns] = await target.query(`SELECT proname FROM pg_proc WHERE proname IN ('revisions_guard', 'decisions_guard')`);
    expect(fns).toEqual([]);
    expect((await m.up()).length).toBe(applied.length);
  });
});
