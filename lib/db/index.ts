import 'server-only';
import type { Sequelize } from 'sequelize';
import { env } from '@/lib/env';
import { createSequelize } from './sequelize';

const globalForDb = globalThis as unknown as { anodyneSequelize?: Sequelize };

// One pool per process; cached on globalThis so dev reloads don't open new pools.
export const sequelize = globalForDb.anodyneSequelize ?? createSequelize(env.DATABASE_URL);
globalForDb.anodyneSequelize = sequelize;
