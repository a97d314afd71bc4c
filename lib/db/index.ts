import 'server-only';
import type { Sequelize } from 'sequelize';
import { env } from '@/lib/env';
import { initModels } from '@/models';
import { createSequelize } from './sequelize';

const globalForDb = globalThis as unknown as { anodyneSequelize?: Sequelize };

// One pool per process, cached on globalThis (dev reloads would otherwise open new pools). Next may bundle
// the model classes more than once (routes, pages, instrumentation), so every copy is initialised against
// the shared instance; initModels is idempotent per copy.
export const sequelize = globalForDb.anodyneSequelize ?? createSequelize(env.DATABASE_URL);
globalForDb.anodyneSequelize = sequelize;
initModels(sequelize);
