// Migrations and seeders (umzug): npm run db:migrate | db:migrate:undo | db:seed | db:reset
import { migrator as makeMigrator, seeder as makeSeeder } from '../lib/db/migrator';
import { grantAppRole } from '../lib/db/roles';
import { createSequelize, DEFAULT_DATABASE_URL } from '../lib/db/sequelize';

// Migrations and seeds run as the owner role (MIGRATION_DATABASE_URL); the app connects as a role that owns nothing.
const sequelize = createSequelize(process.env.MIGRATION_DATABASE_URL ?? process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL);
const migrator = makeMigrator(sequelize);
const seeder = makeSeeder(sequelize);

async function main() {
  const cmd = process.argv[2] ?? 'migrate';
  if (cmd === 'migrate') {
    const done = await migrator.up();
    console.log(`[db] migrations applied: ${done.length}`);
    if (!(await grantAppRole(sequelize))) console.log(`[db] no role ${process.env.APP_DB_ROLE ?? 'anodyne_app'}: row grants for the app skipped`);
  } else if (cmd === 'undo') {
    const all = process.argv[3] === '--all';
    const done = await migrator.down(all ? { to: 0 } : undefined);
    console.log(`[db] migrations reverted: ${done.length}`);
  } else if (cmd === 'seed') {
    const done = await seeder.up();
    console.log(done.length ? `[db] demo data seeded: ${done.map((d) => d.name).join(', ')}` : '[db] demo data already present');
  } else if (cmd === 'reset') {
    await seeder.down({ to: 0 });
    await migrator.down({ to: 0 });
    await migrator.up();
    await grantAppRole(sequelize);
    await seeder.up();
    console.log('[db] reset done');
  } else {
    throw new Error(`unknown command ${cmd}`);
  }
}

main()
  .then(() => sequelize.close())
  .catch(async (err) => {
    console.error('[db]', err instanceof Error ? err.message : err);
    await sequelize.close();
    process.exit(1);
  });
