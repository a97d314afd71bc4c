import PgBoss from 'pg-boss';
import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// The job queue's tables (pg-boss 10, schema `pgboss`) and the exploration queue, created here by the owner role:
// the app and the workers connect as a role that may not run DDL, so they start pg-boss with migrate: false.
// Keep the queue settings in step with lib/explore/queue-names.ts.
export async function up({ context: qi }: Ctx) {
  await qi.sequelize.query(PgBoss.getConstructionPlans('pgboss'));
  await qi.sequelize.query(`SELECT pgboss.create_queue('explore-run', :options::json)`, {
    replacements: { options: JSON.stringify({ policy: 'standard', retryLimit: 5, retryDelay: 0, retryBackoff: false, expireInSeconds: 4 * 3600 }) },
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.query('DROP SCHEMA IF EXISTS pgboss CASCADE');
}
