// umzug runners for migrations and seeders (used by scripts/db.ts and the migration test; no 'server-only').
import path from 'node:path';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';

const root = path.resolve(__dirname, '../..');

type Step = { up: (p: { context: QueryInterface }) => Promise<void>; down: (p: { context: QueryInterface }) => Promise<void> };

// Load each file through our own import() so the same TypeScript files run under tsx and under vitest.
const resolve = ({ name, path: file, context }: { name: string; path?: string; context: QueryInterface }) => ({
  name,
  up: async () => ((await import(file!)) as Step).up({ context }),
  down: async () => ((await import(file!)) as Step).down({ context }),
});

export function migrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: { glob: ['migrations/*.ts', { cwd: root }], resolve },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations', modelName: 'SchemaMigration' }),
    logger: undefined,
  });
}

export function seeder(sequelize: Sequelize) {
  return new Umzug({
    migrations: { glob: ['seeders/*.ts', { cwd: root }], resolve },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_seeds', modelName: 'SchemaSeed' }),
    logger: undefined,
  });
}
