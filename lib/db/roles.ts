import { QueryTypes, type Sequelize } from 'sequelize';

// Two database roles: the owner (runs migrations and seeds, owns every table) and the app's role, which owns
// nothing and may only read and write rows: no TRUNCATE, no DDL, no ALTER TABLE … DISABLE TRIGGER, so the
// data rules in SQL (revisions_guard, decisions_guard, unique indexes) hold against the app itself.
export const DEFAULT_APP_ROLE = 'anodyne_app';

function ident(name: string) {
  if (!/^[a-z_][a-z0-9_]*$/i.test(name)) throw new Error(`unexpected role name ${JSON.stringify(name)}`);
  return `"${name}"`;
}

/**
 * Grants the app role row access to every table and sequence in public, now and for the tables later migrations
 * create (default privileges of the owner). Run as the owner after migrating; idempotent. A missing role is
 * skipped (returns false): on a managed PostgreSQL the administrator creates it.
 */
export async function grantAppRole(sequelize: Sequelize, role = process.env.APP_DB_ROLE ?? DEFAULT_APP_ROLE): Promise<boolean> {
  const exists = await sequelize.query('SELECT 1 FROM pg_roles WHERE rolname = :role', { type: QueryTypes.SELECT, replacements: { role } });
  if (exists.length === 0) return false;
  const r = ident(role);
  await sequelize.query(`
    GRANT USAGE ON SCHEMA public TO ${r};
    GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA public TO ${r};
    GRANT USAGE, SELECT, UPDATE ON ALL SEQUENCES IN SCHEMA public TO ${r};
    REVOKE TRUNCATE, REFERENCES, TRIGGER ON ALL TABLES IN SCHEMA public FROM ${r};
    ALTER DEFAULT PRIVILEGES IN SCHEMA public GRANT SELECT, INSERT, UPDATE, DELETE ON TABLES TO ${r};
    ALTER DEFAULT PRIVILEGES IN SCHEMA public GRANT USAGE, SELECT, UPDATE ON SEQUENCES TO ${r};
  `);
  // the job queue (pg-boss schema, made by a migration): rows only, so the app and the workers can send and work jobs
  await sequelize.query(`DO $$ BEGIN IF EXISTS (SELECT 1 FROM pg_namespace WHERE nspname = 'pgboss') THEN
    EXECUTE 'GRANT USAGE ON SCHEMA pgboss TO ${r}';
    EXECUTE 'GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA pgboss TO ${r}';
  END IF; END $$;`);
  // the migration bookkeeping stays the owner's
  for (const t of ['schema_migrations', 'schema_seeds']) {
    await sequelize.query(`DO $$ BEGIN IF to_regclass('public.${t}') IS NOT NULL THEN EXECUTE 'REVOKE INSERT, UPDATE, DELETE ON public.${t} FROM ${r}'; END IF; END $$;`);
  }
  return true;
}
